// The whole analysis (hypotheses, rank, condition number and indices, VIF,
// orthogonality, texts) per scheme and k. Targets (issue 2): floating path
// k = 10 < 20 us, k = 50 < 0.5 ms, k = 200 < 10 ms; exact path k <= 20 < 5 ms.
#include "core/analysis/Analysis.h"
#include "core/analysis/DesignAnalysis.h"
#include "bench/BenchMain.h"
#include "core/base/Limits.h"
#include "core/export/Export.h"
#include "core/model/Design.h"
#include "core/model/Scheme.h"
#include "core/report/AnalysisJson.h"
#include "core/report/AnalysisReport.h"

#include <benchmark/benchmark.h>

#include <QJsonDocument>

#include <random>

#include <sys/resource.h>

using namespace Qt::StringLiterals;
using namespace cb;

namespace {

Factor factorOf(int k)
{
    Factor f;
    for (int i = 0; i < k; ++i)
        f.levels << u"level %1"_s.arg(i + 1);
    return f;
}

Scheme standard(int k, SchemeKind kind)
{
    return makeScheme(factorOf(k), kind).take();
}

// A random custom coding with k-1 columns: exact small fractions or doubles.
Scheme randomCustom(int k, bool exact)
{
    std::mt19937 rng(12345u + unsigned(k));
    std::uniform_int_distribution<int> num(-6, 6), den(1, 4);
    std::normal_distribution<double> gauss;
    Scheme s;
    s.factor = factorOf(k);
    for (int j = 0; j + 1 < k; ++j) {
        Column c{u"c%1"_s.arg(j + 1), {}};
        for (int i = 0; i < k; ++i)
            c.weights.push_back(exact ? Weight::exact(Rational(num(rng), den(rng))) : Weight::approx(gauss(rng)));
        s.columns.push_back(std::move(c));
    }
    return s;
}

long minorPageFaults()
{
    rusage u{};
    getrusage(RUSAGE_SELF, &u);
    return u.ru_minflt;
}

void run(benchmark::State &state, const Scheme &s)
{
    const long faultsBefore = minorPageFaults();
    for (auto _ : state) {
        Analysis a = analyze(s);
        benchmark::DoNotOptimize(a);
    }
    // Memory handed back to the kernel and faulted in again on the next analysis (see
    // core/AllocatorTuning.h): should stay near 0 per analysis.
    state.counters["faults"] = benchmark::Counter(double(minorPageFaults() - faultsBefore), benchmark::Counter::kAvgIterations);
    state.counters["exact"] = analyze(s).exact ? 1 : 0;
}

// At the stated limits (core/base/Limits.h) everything a command does must take under 2 s.
// AnalyzeAtLimit: the analysis of kMaxLevels levels with its text report and its JSON.
// ExportAtLimit: every export format of both matrices, exact and decimal, after one analysis.
// DesignAtCellLimit: a two-factor design of close to kMaxCells cells (all terms), analysed and reported.
void BM_AnalyzeAtLimit(benchmark::State &state)
{
    const Scheme s = standard(kMaxLevels, SchemeKind::Polynomial);
    for (auto _ : state) {
        const Analysis a = analyze(s);
        benchmark::DoNotOptimize(analysisReport(s, a));
        benchmark::DoNotOptimize(QJsonDocument(analysisToJson(s, a)).toJson(QJsonDocument::Indented));
    }
}

void BM_ExportAtLimit(benchmark::State &state)
{
    const Scheme s = standard(kMaxLevels, SchemeKind::Helmert);
    for (auto _ : state) {
        const Analysis a = analyze(s);
        const ExportTable coding = codingTable(s).take();
        const ExportTable hypotheses = hypothesisTable(a).take();
        for (const ExportFormat format : exportFormats())
            for (const bool exact : {false, true}) {
                ExportOptions o;
                o.exact = exact;
                benchmark::DoNotOptimize(exportTable(coding, format, o));
                benchmark::DoNotOptimize(exportTable(hypotheses, format, o));
            }
    }
}

void BM_DesignAtCellLimit(benchmark::State &state)
{
    // The largest a x b <= kMaxCells with a and b as close as the limit allows.
    int a = 2;
    while ((a + 1) * (a + 1) <= kMaxCells)
        ++a;
    const int b = kMaxCells / a;
    Design d;
    for (int f = 0; f < 2; ++f) {
        Factor factor = factorOf(f == 0 ? a : b);
        factor.name = f == 0 ? u"first"_s : u"second"_s;
        d.factors.push_back(makeScheme(factor, SchemeKind::Sum).take());
    }
    d.terms = Design::fullFactorial(2);
    for (int c = 0; c < a * b; ++c)
        d.cellN.push_back(Rational(3 + c % 4));
    for (auto _ : state) {
        const DesignAnalysis da = analyzeDesign(d);
        benchmark::DoNotOptimize(designReport(d, da));
        benchmark::DoNotOptimize(QJsonDocument(designAnalysisToJson(d, da)).toJson(QJsonDocument::Indented));
    }
    state.counters["cells"] = a * b;
}

void BM_Treatment(benchmark::State &state) { run(state, standard(int(state.range(0)), SchemeKind::Treatment)); }
void BM_Helmert(benchmark::State &state) { run(state, standard(int(state.range(0)), SchemeKind::Helmert)); }
void BM_Polynomial(benchmark::State &state) { run(state, standard(int(state.range(0)), SchemeKind::Polynomial)); }
void BM_RandomFloat(benchmark::State &state) { run(state, randomCustom(int(state.range(0)), false)); }
void BM_RandomExact(benchmark::State &state) { run(state, randomCustom(int(state.range(0)), true)); }

} // namespace

BENCHMARK(BM_Treatment)->Arg(3)->Arg(10)->Arg(20)->Arg(50)->Arg(200)->Unit(benchmark::kMicrosecond);
BENCHMARK(BM_Helmert)->Arg(3)->Arg(10)->Arg(20)->Arg(50)->Arg(200)->Unit(benchmark::kMicrosecond);
BENCHMARK(BM_Polynomial)->Arg(3)->Arg(10)->Arg(50)->Arg(200)->Unit(benchmark::kMicrosecond);
BENCHMARK(BM_RandomFloat)->Arg(3)->Arg(10)->Arg(50)->Arg(200)->Unit(benchmark::kMicrosecond);
BENCHMARK(BM_AnalyzeAtLimit)->Unit(benchmark::kMillisecond);
BENCHMARK(BM_ExportAtLimit)->Unit(benchmark::kMillisecond);
BENCHMARK(BM_DesignAtCellLimit)->Unit(benchmark::kMillisecond);
BENCHMARK(BM_RandomExact)->Arg(3)->Arg(10)->Arg(20)->Unit(benchmark::kMicrosecond);

int main(int argc, char **argv)
{
    return runBenchmarks(argc, argv);
}
