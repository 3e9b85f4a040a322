// The data check on a large long-format file: one streaming pass over 10^6 rows from 2,000
// participants (three levels of a factor measured within participants, replicate trials), then
// the fit, pooled and by participant. Speed and memory targets live here, never in timed tests:
// the read and fit of such a file should take under 0.5 s and keep the process under 64 MB
// (memory does not grow with the file: the reader works in fixed-size blocks and keeps one
// running statistic per level, and per participant and level).
#include "bench/BenchMain.h"

#include "core/data/DataFit.h"
#include "core/data/DataReader.h"
#include "core/model/SchemeEdits.h"

#include <QByteArray>
#include <QFile>
#include <QString>
#include <QTemporaryDir>

#include <random>
#include <sys/resource.h>

using namespace cb;
using namespace Qt::StringLiterals;

namespace {

constexpr int kParticipants = 2000;
constexpr int kRows = 1'000'000;

// Written once, a block at a time, so the benchmark's own memory stays small.
const QString &largeFile()
{
    static QTemporaryDir dir;
    static const QString path = [] {
        const QString file = dir.filePath(u"cues.csv"_s);
        QFile out(file);
        if (!out.open(QIODevice::WriteOnly))
            return QString();
        std::mt19937 rng(20261203u);
        std::normal_distribution<double> person(500.0, 60.0), noise(0.0, 40.0);
        const char *levels[] = {"none", "valid", "invalid"};
        const double effect[] = {0.0, -18.0, 12.0};
        QByteArray block = "participant,cue,rt\n";
        const int perParticipant = kRows / kParticipants;
        for (int p = 0; p < kParticipants; ++p) {
            const double base = person(rng);
            for (int r = 0; r < perParticipant; ++r) {
                const int j = r % 3;
                block += "p" + QByteArray::number(p) + ',' + levels[j] + ',' + QByteArray::number(base + effect[j] + noise(rng), 'f', 2) + '\n';
            }
            if (block.size() > (1 << 20)) {
                out.write(block);
                block.clear();
            }
        }
        out.write(block);
        return file;
    }();
    return path;
}

Scheme cueScheme()
{
    Factor f;
    f.name = u"cue"_s;
    f.levels = {u"none"_s, u"valid"_s, u"invalid"_s};
    f.measure = Measure::Within;
    return makeScheme(f, SchemeKind::Treatment).take();
}

double peakRssMegabytes()
{
    rusage usage{};
    getrusage(RUSAGE_SELF, &usage);
    return double(usage.ru_maxrss) / 1024.0; // kilobytes on Linux
}

void readAndFit(benchmark::State &state, bool byParticipant)
{
    const QString &path = largeFile();
    if (path.isEmpty()) {
        state.SkipWithError("cannot write the data file");
        return;
    }
    const Scheme scheme = cueScheme();
    DataReadOptions options;
    options.factorColumn = u"cue"_s;
    options.responseColumn = u"rt"_s;
    if (byParticipant)
        options.participantColumn = u"participant"_s;
    for (auto _ : state) {
        auto data = readLevelData(path, options);
        if (!data) {
            state.SkipWithError(qPrintable(data.error()));
            return;
        }
        auto fit = byParticipant ? fitParticipants(scheme, *data) : fitScheme(scheme, *data);
        if (!fit || data->usedRows != kRows || (byParticipant && fit->participants != kParticipants)) {
            state.SkipWithError("the fit failed");
            return;
        }
        benchmark::DoNotOptimize(fit->coefficients.data());
    }
    state.SetItemsProcessed(int64_t(state.iterations()) * kRows);
    state.counters["peak_rss_MB"] = peakRssMegabytes();
}

void BM_ReadAndFitByParticipant(benchmark::State &state)
{
    readAndFit(state, true);
}

void BM_ReadAndFitPooled(benchmark::State &state)
{
    readAndFit(state, false);
}

} // namespace

// The pooled read first: the peak RSS each reports is the process's peak so far.
BENCHMARK(BM_ReadAndFitPooled)->Unit(benchmark::kMillisecond)->Iterations(3);
BENCHMARK(BM_ReadAndFitByParticipant)->Unit(benchmark::kMillisecond)->Iterations(3);

int main(int argc, char **argv)
{
    return runBenchmarks(argc, argv);
}
