// Edit-to-update latency of the window (issue 3): from typing a weight into the
// coding grid to every indicator being current. Targets: under 16 ms (one frame)
// for k = 50 levels, under 2 ms for k <= 10.
//   EditToModels: setData on one cell; when it returns, the scheme, its analysis and
//     every model (grid, footers, pairs, hypotheses, meaning, health) are current.
//   EditToPaint: the same, then the event loop runs once: pending layouts and the paint of
//     every part of the window that the change made dirty (into the offscreen backing store).
//   FullRepaint: for scale, a forced repaint of the whole window with no edit.
// Runs offscreen (QT_QPA_PLATFORM=offscreen unless set).
#include "bench/BenchMain.h"
#include "ui/coding/CodingModel.h"
#include "ui/coding/CodingPanel.h"
#include "ui/document/Document.h"
#include "ui/window/MainWindow.h"

#include <benchmark/benchmark.h>

#include <QApplication>

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

void editToPaint(benchmark::State &state, SchemeKind kind)
{
    Window w(int(state.range(0)), kind);
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

void BM_EditToModels_Helmert(benchmark::State &s) { editToModels(s, SchemeKind::Helmert); }
void BM_EditToPaint_Helmert(benchmark::State &s) { editToPaint(s, SchemeKind::Helmert); }
void BM_EditToModels_Polynomial(benchmark::State &s) { editToModels(s, SchemeKind::Polynomial); }
void BM_EditToPaint_Polynomial(benchmark::State &s) { editToPaint(s, SchemeKind::Polynomial); }

} // namespace

// k = 4 and 10 are exact (fractions); 40 is the largest exact k; 50 runs in floating point.
BENCHMARK(BM_EditToModels_Helmert)->Arg(4)->Arg(10)->Arg(40)->Arg(50)->Unit(benchmark::kMicrosecond);
BENCHMARK(BM_EditToPaint_Helmert)->Arg(4)->Arg(10)->Arg(40)->Arg(50)->Unit(benchmark::kMicrosecond);
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
