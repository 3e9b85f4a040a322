#pragma once

#include "core/model/Study.h"

namespace cb {

// A study as both front ends hold it: its derived parts consistent (consistent(), core/model)
// and then every factor's columns that the user has not named named after what they test
// (withCurrentNames, core/analysis/ColumnNames.h). Names come after sizes: what a column
// tests can depend on the planned n.
Study settled(Study study);

} // namespace cb
