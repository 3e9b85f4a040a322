#include "core/report/LevelBars.h"

#include <algorithm>
#include <cmath>

namespace cb {

LevelBarsLayout levelBarsLayout(const std::vector<double> &weights, double left, double top, double width, double height,
                                double maxBarWidth)
{
    LevelBarsLayout out;
    const size_t k = weights.size();
    if (k == 0)
        return out;
    double largest = 0.0;
    for (double w : weights)
        largest = std::max(largest, std::abs(w));
    const bool anyNegative = std::any_of(weights.begin(), weights.end(), [&](double w) { return w < -1e-12 * largest; });
    const double bottom = top + height - 1.0;
    out.zeroY = anyNegative ? std::floor(top + (height - 1.0) / 2.0) : bottom - 1.0;
    const double reach = anyNegative ? std::floor(height / 2.0) - 1.0 : height - 2.0;
    out.slot = width / double(k);
    const double barWidth = std::max(1.0, std::min(maxBarWidth, std::floor(out.slot * 0.7)));
    for (size_t i = 0; i < k; ++i) {
        LevelBar b;
        const double w = weights[i];
        b.center = left + std::floor(out.slot * (double(i) + 0.5));
        b.width = barWidth;
        b.x = b.center - std::floor(barWidth / 2.0);
        b.height = largest > 0.0 ? std::round(std::abs(w) / largest * reach) : 0.0;
        b.sign = b.height == 0.0 ? 0 : (w > 0 ? 1 : -1);
        b.y = w >= 0 ? out.zeroY - b.height : out.zeroY;
        out.bars.push_back(b);
    }
    return out;
}

} // namespace cb
