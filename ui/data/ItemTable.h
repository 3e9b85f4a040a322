#pragma once

#include "core/data/ItemFit.h"
#include "ui/common/CellTable.h"

#include <QStringList>

namespace cb {

// The Check on data panel's by-item table: per coefficient the by-item test beside min F'
// (Clark 1973). Core computes every number (fitItems); this only writes them into cells.
enum ItemColumn { ItemNameColumn, ItemEstimateColumn, ItemTColumn, ItemPColumn, MinFColumn, MinFDfColumn, MinFPColumn, ItemColumnCount };

QStringList itemTableHeaders();
TableRows itemTableRows(const ItemAnalysis &items);

} // namespace cb
