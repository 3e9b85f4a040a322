#pragma once

#include "core/base/Result.h"
#include "core/model/Factor.h"
#include "core/model/PowerPlan.h"
#include "core/power/MixedPower.h"
#include "core/power/Power.h"

#include <optional>

namespace cb {

// The numbers a power plan's texts stand for, for the levels of `levels` (a factor, or a design's
// cells as core/analysis/DesignAnalysis.h's cellScheme has them) and, for a mixed design, its
// layout; checked as validatePowerSettings (or validateMixedPowerSettings) checks them. Within
// participants (the factor, or a mixed design) the sizes are the factor's planned n or the plan's
// total as participants, and the correlation is read; between participants the sizes are the
// factor's planned n or the plan's ratios with its total. A problem names its field: "means",
// "sds", "ratios" (the message names the level), "sd", "total", "n", "correlation",
// "correlations", "alpha" or "target".
Result<PowerSettings> settingsFromPlan(const PowerPlan &plan, const Factor &levels,
                                       const std::optional<MixedLayout> &mixed = std::nullopt);

// Whether the plan takes its group sizes from ratios with a total (between participants).
bool planUsesRatios(const PowerPlan &plan, const Factor &levels);

} // namespace cb
