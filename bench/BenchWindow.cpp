// Edit-to-update latency of the window (issue 3): from typing a weight into the
// coding grid to every indicator being current. Targets: under 16 ms (one frame)
// for k = 50 levels, under 2 ms for k <= 10.
//   EditToModels: setData on one cell; when it returns, the scheme, its analysis and
//     every model (grid, footers, pairs, hypotheses, meaning, health) are current.
//   EditToPaint: the same, then the event loop runs once: pending layouts and the paint of
//     every part of the window that the change made dirty (into the offscreen backing store).
//   FullRepaint: for scale, a forced repaint of the whole window with no edit.
//   OpenAtLimit: a new window opening a study at the stated limit (core/base/Limits.h) until it
//     is painted: arg 0 one factor of kMaxLevels levels, arg 1 a two-factor design of close to
//     kMaxCells cells. Target: under 2 s (and 1 GiB, measured with /usr/bin/time -v).
//   UndoHistoryMemory: heap bytes that 500 undo steps hold at k = 50 (each step types a
//     different cell, so none merge), per step (counter bytes_per_step).
//   Instructions per edit (tools/edit-cost.sh): with CB_EDIT_COST=models or =paint, the first
//     EditToPaint benchmark that runs types 20 edits under callgrind's instrumentation (after one
//     edit to warm up) and exits; callgrind's count does not depend on the machine's load.
// Runs offscreen (QT_QPA_PLATFORM=offscreen unless set).
#include "bench/BenchMain.h"
#include "core/analysis/Settled.h"
#include "core/base/Limits.h"
#include "ui/coding/CodingModel.h"
#include "ui/coding/CodingPanel.h"
#include "ui/document/Document.h"
#include "ui/window/MainWindow.h"

#include <benchmark/benchmark.h>

#include <QApplication>

#include <malloc.h>

#if __has_include(<valgrind/callgrind.h>)
#include <valgrind/callgrind.h>
#define CB_HAVE_CALLGRIND 1
#endif

using namespace Qt::StringLiterals;
using namespace cb;

namespace {

Scheme schemeOf(int k, SchemeKind kind)
{
    Factor f;
    f.name = u"factor"_s;
    for (int i = 0; i < k; ++i)
        f.levels << u"level %1"_s.arg(i + 1);
    // Unequal planned sizes, so that orthogonality and VIF under n are real work.
    for (int i = 0; i < k; ++i)
        f.plannedN.push_back(Rational(10 + 3 * (i % 7)));
    return makeScheme(f, kind).take();
}

struct Window
{
    MainWindow window;
    explicit Window(int k, SchemeKind kind)
        : window([] {
            WindowOptions o;
            o.useRecovery = false;
            return o;
        }())
    {
        window.resize(1400, 900);
        window.document()->reset(schemeOf(k, kind), {});
        window.show();
        QApplication::processEvents();
    }
    // Alternates one cell between two values, as a person retyping it would.
    void edit(bool odd)
    {
        CodingModel *m = window.codingPanel()->codingModel();
        m->setData(m->index(1, 0), odd ? u"1/3"_s : u"-2/7"_s);
    }
};

void editToModels(benchmark::State &state, SchemeKind kind)
{
    Window w(int(state.range(0)), kind);
    bool odd = false;
    for (auto _ : state) {
        w.edit(odd = !odd);
        benchmark::ClobberMemory();
    }
    state.counters["exact"] = w.window.document()->analysis().exact ? 1 : 0;
}

// tools/edit-cost.sh: 20 edits under callgrind's instrumentation, then exit.
void countEdits(Window &w)
{
#ifdef CB_HAVE_CALLGRIND
    const bool paint = qgetenv("CB_EDIT_COST") == "paint";
    w.edit(true);
    QApplication::processEvents();
    CALLGRIND_ZERO_STATS;
    CALLGRIND_START_INSTRUMENTATION;
    for (int i = 0; i < 20; ++i) {
        w.edit(i % 2 == 0);
        if (paint)
            QApplication::processEvents();
    }
    CALLGRIND_STOP_INSTRUMENTATION;
    CALLGRIND_DUMP_STATS_AT("edits");
#else
    Q_UNUSED(w);
    fprintf(stderr, "BenchWindow was built without valgrind/callgrind.h\n");
#endif
    std::exit(0);
}

void editToPaint(benchmark::State &state, SchemeKind kind)
{
    Window w(int(state.range(0)), kind);
    if (qEnvironmentVariableIsSet("CB_EDIT_COST"))
        countEdits(w);
    bool odd = false;
    for (auto _ : state) {
        w.edit(odd = !odd);
        QApplication::processEvents();
    }
}

void BM_FullRepaint(benchmark::State &state)
{
    Window w(int(state.range(0)), SchemeKind::Helmert);
    for (auto _ : state)
        w.window.repaint();
}

// A study at the stated limit: one polynomial factor of kMaxLevels levels, or two sum-coded
// factors a x b <= kMaxCells, a and b as close as the limit allows, with every term.
Study studyAtLimit(bool design)
{
    if (!design)
        return studyOf(schemeOf(kMaxLevels, SchemeKind::Polynomial));
    int a = 2;
    while ((a + 1) * (a + 1) <= kMaxCells)
        ++a;
    Study study;
    for (const int k : {a, kMaxCells / a}) {
        Scheme s = schemeOf(k, SchemeKind::Sum);
        s.factor.name = study.design.factors.empty() ? u"first"_s : u"second"_s;
        s.factor.plannedN.clear();
        study.design.factors.push_back(makeScheme(s.factor, SchemeKind::Sum).take());
    }
    study.design.terms = Design::fullFactorial(2);
    const int cells = study.design.cellCount();
    for (int c = 0; c < cells; ++c)
        study.design.cellN.push_back(Rational(3 + c % 4));
    return settled(std::move(study));
}

void BM_OpenAtLimit(benchmark::State &state)
{
    const Study study = studyAtLimit(state.range(0) == 1);
    for (auto _ : state) {
        MainWindow window([] {
            WindowOptions o;
            o.useRecovery = false;
            return o;
        }());
        window.resize(1400, 900);
        window.document()->reset(study, {});
        window.show();
        QApplication::processEvents();
    }
    state.counters["levels"] = study.design.cellCount();
}

void BM_UndoHistoryMemory(benchmark::State &state)
{
    const int k = int(state.range(0));
    constexpr int kSteps = 500;
    double perStep = 0;
    for (auto _ : state) {
        Document document;
        Scheme scheme = schemeOf(k, SchemeKind::Helmert);
        document.reset(scheme, {});
        const size_t before = mallinfo2().uordblks;
        for (int step = 0; step < kSteps; ++step) {
            const size_t column = size_t(step % scheme.columnCount());
            const size_t level = size_t(step / scheme.columnCount()) % size_t(k);
            scheme.columns[column].weights[level] = Weight::exact(Rational(step + 2, 3));
            document.edit(scheme, u"type"_s);
        }
        perStep = double(mallinfo2().uordblks - before) / kSteps;
        benchmark::DoNotOptimize(document.undoStack()->count());
    }
    state.counters["bytes_per_step"] = perStep;
}

void BM_EditToModels_Helmert(benchmark::State &s) { editToModels(s, SchemeKind::Helmert); }
void BM_EditToPaint_Helmert(benchmark::State &s) { editToPaint(s, SchemeKind::Helmert); }
void BM_EditToModels_Polynomial(benchmark::State &s) { editToModels(s, SchemeKind::Polynomial); }
void BM_EditToPaint_Polynomial(benchmark::State &s) { editToPaint(s, SchemeKind::Polynomial); }

} // namespace

// k = 4 and 10 are exact (fractions); 40 is the largest exact k; 50 runs in floating point.
BENCHMARK(BM_EditToModels_Helmert)->Arg(4)->Arg(10)->Arg(40)->Arg(50)->Unit(benchmark::kMicrosecond);
BENCHMARK(BM_EditToPaint_Helmert)->Arg(4)->Arg(10)->Arg(40)->Arg(50)->Unit(benchmark::kMicrosecond);
BENCHMARK(BM_OpenAtLimit)->Arg(0)->Arg(1)->Unit(benchmark::kMillisecond);
BENCHMARK(BM_UndoHistoryMemory)->Arg(50)->Iterations(1)->Unit(benchmark::kMillisecond);
BENCHMARK(BM_FullRepaint)->Arg(10)->Arg(50)->Unit(benchmark::kMicrosecond);
BENCHMARK(BM_EditToModels_Polynomial)->Arg(10)->Arg(50)->Unit(benchmark::kMicrosecond);
BENCHMARK(BM_EditToPaint_Polynomial)->Arg(10)->Arg(50)->Unit(benchmark::kMicrosecond);

int main(int argc, char **argv)
{
    if (qEnvironmentVariableIsEmpty("QT_QPA_PLATFORM"))
        qputenv("QT_QPA_PLATFORM", "offscreen");
    QApplication app(argc, argv);
    return runBenchmarks(argc, argv);
}
