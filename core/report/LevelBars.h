#pragma once

#include <vector>

namespace cb {

// The per-level picture of a hypothesis row: one bar per level, up for a positive weight and
// down for a negative one, its height proportional to the weight's size. One geometry for every
// place that draws it: the window's coefficient cards (QPainter, ui/meaning/MeaningDelegate) and
// the study sheet's inline SVG (core/report/StudySheet).
struct LevelBar
{
    double x = 0.0;      // left edge
    double y = 0.0;      // top edge
    double width = 0.0;
    double height = 0.0; // 0 for a zero weight: drawn as a short flat mark at zeroY
    double center = 0.0; // the slot's centre, where the level's name and weight go
    int sign = 0;        // -1, 0, +1
};

struct LevelBarsLayout
{
    double zeroY = 0.0; // the baseline: the middle when some weights are negative, else the bottom
    double slot = 0.0;  // the width each level gets
    std::vector<LevelBar> bars;
};

// The bars of `weights` inside the chart box (left, top, width, height), at most maxBarWidth wide.
// Bar edges fall on whole units, as a painter on pixels wants them.
LevelBarsLayout levelBarsLayout(const std::vector<double> &weights, double left, double top, double width, double height,
                                double maxBarWidth);

} // namespace cb
