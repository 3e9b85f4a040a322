// Fuzz target: a scheme (or design) loaded from the input, analysed, and written
// in every export format, as JSON and as the text report. Every output must stay
// well formed for its language and show no non-finite number.
#include "tests/fuzz/FuzzChecks.h"

#include "core/files/StudyFile.h"
#include "core/analysis/DesignAnalysis.h"
#include "core/analysis/Analysis.h"
#include "core/report/AnalysisJson.h"
#include "core/report/AnalysisReport.h"
#include "core/model/Design.h"
#include "core/export/Export.h"
#include "core/files/SchemeFile.h"

#include <QJsonDocument>

using namespace Qt::StringLiterals;
using namespace cb;

namespace {

// Larger schemes are correct but slow to analyse; the parsers are fuzzed elsewhere.
constexpr int kMaxFuzzLevels = 48;

void checkScheme(const Scheme &scheme, const Analysis &a, const char *where)
{
    fuzz::require(fuzz::checkAnalysisFinite(a), where);
    if (auto t = codingTable(scheme))
        fuzz::require(fuzz::checkAllExports(*t), where);
    if (auto t = hypothesisTable(a))
        fuzz::require(fuzz::checkAllExports(*t), where);
    const QString json = QString::fromUtf8(QJsonDocument(analysisToJson(scheme, a)).toJson());
    fuzz::require(fuzz::checkNoNonFiniteNumber(json, true), where);
    if (fuzz::namesAreNeutral(scheme))
        fuzz::require(fuzz::checkNoNonFiniteNumber(analysisReport(scheme, a)), where);
}

} // namespace

extern "C" int LLVMFuzzerTestOneInput(const std::uint8_t *data, std::size_t size)
{
    const QByteArray bytes(reinterpret_cast<const char *>(data), qsizetype(size));
    if (isDesignJson(bytes)) {
        auto d = designFromJson(bytes, u"fuzz.json"_s);
        if (!d || d->cellCount() > kMaxFuzzLevels)
            return 0;
        const DesignAnalysis da = analyzeDesign(*d);
        if (!da.cellScheme.columns.empty())
            checkScheme(da.cellScheme, da.analysis, "design");
        const QString json = QString::fromUtf8(QJsonDocument(designAnalysisToJson(*d, da)).toJson());
        fuzz::require(fuzz::checkNoNonFiniteNumber(json, true), "design json");
        return 0;
    }
    auto s = schemeFromJson(bytes, u"fuzz.json"_s);
    if (!s || s->levelCount() > kMaxFuzzLevels)
        return 0;
    checkScheme(*s, analyze(*s), "scheme");
    return 0;
}
