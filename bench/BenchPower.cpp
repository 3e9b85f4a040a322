// Power and the full sample-size search (each contrast and the omnibus F-test)
// for 10 planned contrasts at k = 10. Target: well within one frame (16 ms).
#include "bench/BenchMain.h"
#include "core/power/Power.h"

#include <benchmark/benchmark.h>

using namespace cb;

namespace {

// Nine comparisons with the first level and a linear trend, over means that rise
// unevenly from 0 to 1 SD: effects from small (0.1 SD) to large.
Eigen::MatrixXd tenContrasts()
{
    const int k = 10;
    Eigen::MatrixXd rows = Eigen::MatrixXd::Zero(10, k);
    for (int j = 1; j < k; ++j) {
        rows(j - 1, 0) = -1;
        rows(j - 1, j) = 1;
    }
    for (int i = 0; i < k; ++i)
        rows(9, i) = 2 * i - (k - 1);
    return rows;
}

PowerSettings settings(bool welch, Adjustment adjustment)
{
    PowerSettings s;
    s.means = {0.0, 0.1, 0.25, 0.3, 0.45, 0.5, 0.6, 0.8, 0.85, 1.0};
    s.sd = 1.0;
    if (welch)
        s.sds = {1.0, 1.2, 0.8, 1.5, 1.0, 0.9, 1.1, 1.3, 0.7, 1.0};
    s.n = std::vector<double>(10, 20.0);
    s.adjustment = adjustment;
    return s;
}

void runSearch(benchmark::State &state, const PowerSettings &s)
{
    const Eigen::MatrixXd rows = tenContrasts();
    for (auto _ : state) {
        auto report = computePower(rows, {}, s);
        benchmark::DoNotOptimize(report);
        if (!report.ok())
            state.SkipWithError("computePower failed");
    }
}

void BM_SampleSizeSearch10Contrasts(benchmark::State &state)
{
    runSearch(state, settings(false, Adjustment::None));
}
BENCHMARK(BM_SampleSizeSearch10Contrasts)->Unit(benchmark::kMillisecond);

void BM_SampleSizeSearch10ContrastsBonferroni(benchmark::State &state)
{
    runSearch(state, settings(false, Adjustment::Bonferroni));
}
BENCHMARK(BM_SampleSizeSearch10ContrastsBonferroni)->Unit(benchmark::kMillisecond);

void BM_SampleSizeSearch10ContrastsWelch(benchmark::State &state)
{
    runSearch(state, settings(true, Adjustment::Sidak));
}
BENCHMARK(BM_SampleSizeSearch10ContrastsWelch)->Unit(benchmark::kMillisecond);

// A 60-point power curve for one contrast, as the panel draws it.
void BM_PowerCurve60Points(benchmark::State &state)
{
    const Eigen::MatrixXd rows = tenContrasts();
    const PowerSettings s = settings(false, Adjustment::None);
    const std::vector<long long> sizes = powerCurveSizes(800, 60);
    for (auto _ : state) {
        auto curve = powerCurve(rows, 0, s, sizes);
        benchmark::DoNotOptimize(curve);
    }
}
BENCHMARK(BM_PowerCurve60Points)->Unit(benchmark::kMillisecond);

} // namespace

int main(int argc, char **argv)
{
    return runBenchmarks(argc, argv);
}
