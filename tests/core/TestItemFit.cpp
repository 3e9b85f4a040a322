// The by-item analysis beside the by-participant one and Clark's (1973) min F' (core/data/ItemFit:
// readLevelData with participant and item columns, fitItems, minFPrime), against NumPy/SciPy
// (tests/python/item_fit_check.py): each item's cell means, one-sample t on the items' contrast
// scores, Hotelling's T^2 by item through its F, F1, F2, min F' and its p from scipy.stats.f;
// items missing a level; the errors; the command line's JSON and report.
#include "core/data/DataFit.h"
#include "core/data/DataReader.h"
#include "core/data/ItemFit.h"
#include "core/files/StudyFile.h"

#include "tests/support/FitTestSupport.h"
#include "tests/support/ProcessRunner.h"
#include "tests/support/WithinFitSupport.h"

#include <QJsonArray>
#include <QJsonDocument>
#include <QTemporaryDir>
#include <QTest>

#include <cmath>
#include <random>

using namespace Qt::StringLiterals;
using namespace cb;
using test::nearRelative;

namespace {

const char *const kLevels[] = {"none", "valid", "invalid"};

// Generated reaction times in a Latin square: participant p sees item i at level (i + p) mod 3,
// twice; participants and items each have a speed of their own. Item w5 is never shown at
// 'invalid' (an incomplete item).
QByteArray generatedData(int participants, int items, unsigned seed)
{
    std::mt19937 rng(seed);
    std::normal_distribution<double> person(500.0, 50.0), word(0.0, 30.0), noise(0.0, 25.0);
    const double effect[] = {0.0, -15.0, 10.0};
    std::vector<double> itemSpeed;
    for (int i = 0; i < items; ++i)
        itemSpeed.push_back(word(rng));
    QByteArray out = "participant,item,level,y\n";
    for (int p = 0; p < participants; ++p) {
        const double base = person(rng);
        for (int i = 0; i < items; ++i) {
            const int j = (i + p) % 3;
            if (i == 5 && j == 2)
                continue;
            for (int r = 0; r < 1 + (p % 2); ++r)
                out += "s" + QByteArray::number(p) + ",w" + QByteArray::number(i) + ',' + kLevels[j] + ','
                    + QByteArray::number(base + itemSpeed[size_t(i)] + effect[j] + noise(rng), 'g', 17) + '\n';
        }
    }
    return out;
}

Result<DataSummary> read(const QByteArray &bytes, const QString &item = u"item"_s, const QString &participant = u"participant"_s)
{
    DataReadOptions o;
    o.factorColumn = u"level"_s;
    o.responseColumn = u"y"_s;
    o.participantColumn = participant;
    o.itemColumn = item;
    o.blockBytes = 4096; // several blocks
    return readLevelDataFromBytes(bytes, u"rt.csv"_s, o);
}

} // namespace

class TestItemFit : public QObject
{
    Q_OBJECT
private slots:
    void agreesWithScipy_data();
    void agreesWithScipy();
    void minFPrimeByHand();
    void readerKeepsEachItemsCells();
    void errorsNameTheItemOrLine_data();
    void errorsNameTheItemOrLine();
    void commandLine();
    void designByItemAgreesWithScipy();
    void designWithAFactorBetweenItems();
};

void TestItemFit::agreesWithScipy_data()
{
    QTest::addColumn<int>("kind");
    QTest::addColumn<int>("participants");
    QTest::addColumn<int>("items");
    QTest::newRow("treatment, 24 x 18") << int(SchemeKind::Treatment) << 24 << 18;
    QTest::newRow("helmert, 30 x 12") << int(SchemeKind::Helmert) << 30 << 12;
    QTest::newRow("polynomial, 12 x 24") << int(SchemeKind::Polynomial) << 12 << 24;
}

void TestItemFit::agreesWithScipy()
{
    QFETCH(int, kind);
    QFETCH(int, participants);
    QFETCH(int, items);
    const QByteArray bytes = generatedData(participants, items, 11u + unsigned(participants * items));
    QTemporaryDir dir;
    const QString path = dir.filePath(u"rt.csv"_s);
    QVERIFY(test::writeFile(path, bytes));
    const Scheme scheme = test::withinCueScheme(SchemeKind(kind));
    auto data = read(bytes);
    QVERIFY2(data.ok(), qPrintable(data.error()));
    FitOptions options;
    options.adjust = Adjustment::Holm;
    auto fit = fitParticipants(scheme, *data, options);
    QVERIFY2(fit.ok(), qPrintable(fit.error()));
    auto byItem = fitItems(scheme, *data, *fit, options);
    QVERIFY2(byItem.ok(), qPrintable(byItem.error()));
    QCOMPARE(byItem->column, u"item"_s);
    QCOMPARE(byItem->byItem.participants, items); // counts items in the participants' role
    QCOMPARE(byItem->byItem.completeParticipants, items - 1);
    QCOMPARE(byItem->byItem.incompleteParticipants, QStringList{u"w5 (no 'invalid')"_s});
    QVERIFY(byItem->byItem.notes.join(u" "_s).contains(u"1 item lacks a level and is left out"_s));
    QVERIFY(!byItem->byItem.notes.join(u" "_s).contains(u"participant"_s));

    const QJsonObject request{{u"data"_s, path},
                              {u"levels"_s, QJsonArray{u"none"_s, u"valid"_s, u"invalid"_s}},
                              {u"rows"_s, test::hypothesisRowsJson(scheme)},
                              {u"alpha"_s, 0.05}};
    const QJsonObject py = test::runPython(u"item_fit_check.py"_s, {}, QJsonDocument(request).toJson());
    QVERIFY2(!py.contains(u"error"_s), qPrintable(py[u"error"_s].toString()));
    QCOMPARE(py[u"incomplete_items"_s].toArray(), QJsonArray{u"w5"_s});
    const QJsonArray reference = py[u"by_item"_s].toArray();
    const QJsonArray referenceP = py[u"by_participant"_s].toArray();
    const QJsonArray referenceMinF = py[u"min_f"_s].toArray();
    QCOMPARE(reference.size(), qsizetype(byItem->byItem.coefficients.size()));
    QCOMPARE(byItem->minF.size(), byItem->byItem.coefficients.size());
    for (size_t c = 0; c < byItem->byItem.coefficients.size(); ++c) {
        const QString differs = test::contrastTestDiffers(byItem->byItem.coefficients[c], reference[qsizetype(c)].toObject(), u"items"_s);
        QVERIFY2(differs.isEmpty(), qPrintable(differs));
        // The by-participant t beside it, then min F'.
        QVERIFY(nearRelative(fit->coefficients[c].t, referenceP[qsizetype(c)].toObject()[u"t"_s].toDouble(), 1e-9));
        const MinFPrime &m = byItem->minF[c];
        const QJsonObject refM = referenceMinF[qsizetype(c)].toObject();
        QVERIFY(nearRelative(m.f1, refM[u"f1"_s].toDouble(), 1e-9));
        QVERIFY(nearRelative(m.f2, refM[u"f2"_s].toDouble(), 1e-9));
        QVERIFY(nearRelative(m.f, refM[u"f"_s].toDouble(), 1e-9));
        QCOMPARE(m.df1, 1.0);
        QVERIFY(nearRelative(m.df2, refM[u"df2"_s].toDouble(), 1e-9));
        QVERIFY2(nearRelative(m.p, refM[u"p"_s].toDouble(), 1e-8), qPrintable(u"%1 vs %2"_s.arg(m.p).arg(refM[u"p"_s].toDouble())));
        // min F' is never larger than either F.
        QVERIFY(m.f <= std::min(m.f1, m.f2));
    }
    const QJsonObject h = py[u"hotelling_by_item"_s].toObject();
    QVERIFY(nearRelative(byItem->byItem.f, h[u"f"_s].toDouble(), 1e-9));
    QCOMPARE(byItem->byItem.fDf1, h[u"df1"_s].toDouble());
    QCOMPARE(byItem->byItem.fDf2, h[u"df2"_s].toDouble());
    QVERIFY(nearRelative(byItem->byItem.fP, h[u"p"_s].toDouble(), 1e-9));
    QVERIFY(byItem->byItem.omnibusHypothesis.contains(u"items with every level"_s));

    // JSON: the fit's keys unchanged, by_item and min_f added.
    const QJsonObject before = fitResultToJson(*fit, *data);
    QJsonObject json = before;
    addItemAnalysisToJson(json, *byItem);
    for (auto it = before.begin(); it != before.end(); ++it)
        QCOMPARE(json.value(it.key()), it.value());
    const QJsonObject b = json[u"by_item"_s].toObject();
    QCOMPARE(b[u"count"_s].toInt(), items);
    QCOMPARE(b[u"complete"_s].toInt(), items - 1);
    QCOMPARE(b[u"omnibus"_s].toObject()[u"test"_s].toString(), u"hotelling"_s);
    QCOMPARE(b[u"omnibus"_s].toObject()[u"items"_s].toInt(), items - 1);
    QCOMPARE(b[u"coefficients"_s].toArray()[1].toObject()[u"items"_s].toInt(), byItem->byItem.coefficients[1].participants);
    const QJsonObject m1 = json[u"min_f"_s].toArray()[1].toObject();
    QCOMPARE(m1[u"f"_s].toDouble(), byItem->minF[1].f);
    QCOMPARE(m1[u"df1"_s].toDouble(), 1.0);
    QCOMPARE(m1[u"p"_s].toDouble(), byItem->minF[1].p);
}

// Clark's formula on round numbers, worked by hand: F1 = 4 (20 df), F2 = 6 (10 df):
// min F' = 24 / 10 = 2.4, df = 100 / (16 / 10 + 36 / 20) = 100 / 3.4.
void TestItemFit::minFPrimeByHand()
{
    const MinFPrime m = minFPrime(4.0, 20.0, 6.0, 10.0);
    QCOMPARE(m.f, 2.4);
    QVERIFY(nearRelative(m.df2, 100.0 / 3.4, 1e-15));
    QCOMPARE(m.df1, 1.0);
    QVERIFY(m.p > 0.0 && m.p < 1.0);
    QVERIFY(std::isnan(minFPrime(0.0, 20.0, 0.0, 10.0).f)); // both 0: undefined
    QVERIFY(std::isnan(minFPrime(std::nan(""), 20.0, 6.0, 10.0).p));
    QCOMPARE(minFPrime(0.0, 20.0, 6.0, 10.0).f, 0.0);
}

void TestItemFit::readerKeepsEachItemsCells()
{
    auto data = read("participant,item,level,y\na,w1,x,1\nb,w1,x,3\na,w2,z,10\nb,w1,z,20\na,w1,z,30\n");
    QVERIFY2(data.ok(), qPrintable(data.error()));
    QCOMPARE(data->items, (QStringList{u"w1"_s, u"w2"_s}));
    QCOMPARE(data->itemLines, (std::vector<qint64>{2, 4}));
    QCOMPARE(data->itemCells[0][0].mean, 2.0); // over the participants' rows
    QCOMPARE(data->itemCells[0][1].mean, 25.0);
    QCOMPARE(data->itemCells[1][0].n, 0.0);
    QCOMPARE(data->itemCells[1][1].mean, 10.0);
    QCOMPARE(data->participantCells[0][1].mean, 20.0); // the participants' cells as before
}

void TestItemFit::errorsNameTheItemOrLine_data()
{
    QTest::addColumn<QByteArray>("bytes");
    QTest::addColumn<QString>("item");
    QTest::addColumn<QString>("participant");
    QTest::addColumn<QString>("message");
    const QByteArray good = "participant,item,level,y\na,w1,none,1\na,w1,valid,2\na,w1,invalid,3\n";
    QTest::newRow("item column missing") << good << u"word"_s << u"participant"_s
                                         << u"rt.csv: no column 'word' for the item; the columns are"_s;
    QTest::newRow("item column is the participant column") << good << u"participant"_s << u"participant"_s
                                                           << u"rt.csv: the item column ('participant') is also"_s;
    QTest::newRow("item without participant") << good << u"item"_s << QString() << u"an item column needs a participant column"_s;
    QTest::newRow("missing item value") << QByteArray("participant,item,level,y\na,w1,none,1\na, ,valid,2\n") << u"item"_s
                                        << u"participant"_s << u"rt.csv line 3: the item (column 'item') is empty"_s;
    QTest::newRow("item with one level") << good + "b,w1,none,4\nb,w1,valid,5\nb,w2,invalid,6\nb,w2,invalid,7\n" << u"item"_s
                                         << u"participant"_s
                                         << u"item 'w2' (column 'item', first on line 7) has values at level 'invalid' only"_s;
}

void TestItemFit::errorsNameTheItemOrLine()
{
    QFETCH(QByteArray, bytes);
    QFETCH(QString, item);
    QFETCH(QString, participant);
    QFETCH(QString, message);
    auto data = read(bytes, item, participant);
    QString error = data ? QString() : data.error();
    if (data) {
        const Scheme scheme = test::withinCueScheme(SchemeKind::Treatment);
        auto fit = fitParticipants(scheme, *data);
        QVERIFY2(fit.ok(), qPrintable(fit.error()));
        auto items = fitItems(scheme, *data, *fit);
        QVERIFY(!items.ok());
        error = items.error();
    }
    QVERIFY2(error.startsWith(message), qPrintable(error));
}

// fit --participant --item: today's keys unchanged, by_item and min_f added; the report's sections; bad input.
void TestItemFit::commandLine()
{
    QTemporaryDir dir;
    const QString path = dir.filePath(u"rt.csv"_s);
    QVERIFY(test::writeFile(path, generatedData(24, 18, 5u)));
    const QStringList base{u"fit"_s,      u"--data"_s,   path,        u"--factor"_s, u"level"_s, u"--response"_s, u"y"_s,
                           u"--levels"_s, u"none,valid,invalid"_s, u"--scheme"_s, u"treatment"_s, u"--within"_s,
                           u"--participant"_s, u"participant"_s};
    const test::ProcessRun plain = test::runCli(base + QStringList{u"--json"_s});
    QVERIFY2(plain.exitCode == 0, plain.err.constData());
    const test::ProcessRun run = test::runCli(base + QStringList{u"--item"_s, u"item"_s, u"--json"_s});
    QVERIFY2(run.exitCode == 0, run.err.constData());
    const QJsonObject without = QJsonDocument::fromJson(plain.out).object();
    const QJsonObject o = QJsonDocument::fromJson(run.out).object();
    for (auto it = without.begin(); it != without.end(); ++it)
        QCOMPARE(o.value(it.key()), it.value());
    QCOMPARE(o.keys().size(), without.keys().size() + 2);
    const QJsonObject byItem = o[u"by_item"_s].toObject();
    QCOMPARE(byItem[u"column"_s].toString(), u"item"_s);
    QCOMPARE(byItem[u"count"_s].toInt(), 18);
    QCOMPARE(byItem[u"incomplete"_s].toArray(), QJsonArray{u"w5 (no 'invalid')"_s});
    const QJsonObject valid = byItem[u"coefficients"_s].toArray()[1].toObject();
    QCOMPARE(valid[u"items"_s].toInt(), 18);
    QCOMPARE(valid[u"df"_s].toDouble(), 17.0);
    const QJsonObject invalid = byItem[u"coefficients"_s].toArray()[2].toObject();
    QCOMPARE(invalid[u"items"_s].toInt(), 17); // w5 has no 'invalid'
    const QJsonArray minF = o[u"min_f"_s].toArray();
    QCOMPARE(minF.size(), 3);
    for (const char16_t *key : {u"name", u"f", u"df1", u"df2", u"p", u"f1", u"f2"})
        QVERIFY(minF[1].toObject().contains(QString::fromUtf16(key)));
    const double t1 = o[u"coefficients"_s].toArray()[1].toObject()[u"t"_s].toDouble();
    QVERIFY(nearRelative(minF[1].toObject()[u"f1"_s].toDouble(), t1 * t1, 1e-12));

    const test::ProcessRun text = test::runCli(base + QStringList{u"--item"_s, u"item"_s});
    QVERIFY2(text.exitCode == 0, text.err.constData());
    QVERIFY(text.outText().contains(u"By participant (column 'participant')"_s));
    QVERIFY(text.outText().contains(u"By item (column 'item')"_s));
    QVERIFY(text.outText().contains(u"min F\u2032 (Clark 1973)"_s));
    QVERIFY(text.outText().contains(u"not a mixed-effects model with crossed random effects"_s));
    QVERIFY(text.outText().contains(u"w5 (no 'invalid')"_s));

    const test::ProcessRun missing = test::runCli(base + QStringList{u"--item"_s, u"word"_s});
    QCOMPARE(missing.exitCode, 2);
    QVERIFY2(missing.errText().contains(u"no column 'word' for the item"_s), missing.err.constData());
    QStringList noParticipant = base.mid(0, base.size() - 2);
    const test::ProcessRun alone = test::runCli(noParticipant + QStringList{u"--item"_s, u"item"_s});
    QCOMPARE(alone.exitCode, 2);
    QVERIFY2(alone.errText().contains(u"--item needs --participant"_s), alone.err.constData());

}

namespace {

// The warmup demo's design (2 routines between singers x 3 vowels within) read by 16 singers
// with 12 tunes as items: singer p sings tune i on vowel (i + p) mod 3, so each singer has every
// vowel and each tune is heard with both routines and every vowel (every factor within items).
// With tuneTiedToRoutine, tune i is sung only by singers of routine i mod 2 (routine varies
// between items). Columns: participant, item, routine, vowel, level (the cell), y.
QByteArray warmupWithTunes(bool tuneTiedToRoutine)
{
    std::mt19937 rng(2026);
    std::normal_distribution<double> noise(0.0, 5.0);
    const QStringList vowels{u"ah"_s, u"ee"_s, u"oo"_s};
    const QStringList routines{u"humming"_s, u"lip trills"_s};
    std::vector<double> tune(12), singer(16);
    for (double &v : tune)
        v = noise(rng) * 0.6;
    for (double &v : singer)
        v = noise(rng) * 0.8;
    QByteArray out = "participant,item,routine,vowel,level,y\n";
    for (int p = 0; p < 16; ++p)
        for (int i = 0; i < 12; ++i) {
            if (tuneTiedToRoutine && i % 2 != p % 2)
                continue;
            const int v = (i + p) % 3;
            const double y = 20.0 + 3.0 * (p % 2) + (v == 1 ? 4.0 : v == 2 ? 2.0 : 0.0) + tune[size_t(i)] + singer[size_t(p)] + noise(rng);
            out += u"s%1,t%2,%3,%4,%3\u00b7%4,%5\n"_s.arg(p + 1).arg(i + 1).arg(routines[p % 2], vowels[v]).arg(y, 0, 'g', 17).toUtf8();
        }
    return out;
}

} // namespace

// The by-item analysis of a design whose factors all vary within items: each design column on
// the tunes' scores, against NumPy/SciPy (item_fit_check.py: the tunes' cell means by pandas,
// one-sample t on the scores of each hypothesis row over the cells), and min F' from the
// by-participant t of the mixed fit (checked against statsmodels in TestMixedFit) and that t.
void TestItemFit::designByItemAgreesWithScipy()
{
    QTemporaryDir dir;
    const QString path = dir.filePath(u"tunes.csv"_s);
    QVERIFY(test::writeFile(path, warmupWithTunes(false)));
    const QString warmup = QStringLiteral(CB_SOURCE_DIR) + u"/resources/demos/warmup.json"_s;
    const QStringList base{u"fit"_s, u"--data"_s, path, u"--file"_s, warmup, u"--response"_s, u"y"_s, u"--participant"_s, u"participant"_s};
    const test::ProcessRun run = test::runCli(base + QStringList{u"--item"_s, u"item"_s, u"--json"_s});
    QVERIFY2(run.exitCode == 0, run.err.constData());
    const QJsonObject o = QJsonDocument::fromJson(run.out).object();
    const QJsonArray byParticipant = o[u"coefficients"_s].toArray();
    const QJsonArray byItem = o[u"by_item"_s].toObject()[u"coefficients"_s].toArray();
    const QJsonArray minF = o[u"min_f"_s].toArray();
    QCOMPARE(byItem.size(), byParticipant.size());
    QCOMPARE(minF.size(), byParticipant.size());
    QCOMPARE(o[u"by_item"_s].toObject()[u"count"_s].toInt(), 12);

    auto study = loadStudy(warmup);
    QVERIFY(study.ok());
    const Scheme cells = cellScheme(study->design).value();
    const Analysis analysis = analyze(cells);
    const QJsonObject request{{u"data"_s, path},
                              {u"levels"_s, QJsonArray::fromStringList(cells.factor.levels)},
                              {u"rows"_s, test::hypothesisRowsJson(cells)},
                              {u"alpha"_s, 0.05}};
    const QJsonObject py = test::runPython(u"item_fit_check.py"_s, {}, QJsonDocument(request).toJson());
    QVERIFY2(!py.contains(u"error"_s), qPrintable(py[u"error"_s].toString()));
    const QJsonArray reference = py[u"by_item"_s].toArray();
    QCOMPARE(reference.size(), qsizetype(analysis.columnNames.size() + 1));
    for (qsizetype c = 0; c < byItem.size(); ++c) {
        const QJsonObject mine = byItem[c].toObject();
        QCOMPARE(mine[u"name"_s].toString(), byParticipant[c].toObject()[u"name"_s].toString()); // paired by name
        // The row of the same name among the cell scheme's hypotheses (the intercept first).
        const qsizetype r = c == 0 ? 0 : analysis.columnNames.indexOf(mine[u"name"_s].toString()) + 1;
        QVERIFY2(r >= 0 && r < reference.size(), qPrintable(mine[u"name"_s].toString()));
        const QJsonObject ref = reference[r].toObject();
        for (const char16_t *key : {u"estimate", u"se", u"t", u"p", u"ci_low", u"ci_high", u"df"}) {
            const QString k = QString::fromUtf16(key);
            QVERIFY2(nearRelative(mine[k].toDouble(), ref[k].toDouble(), 1e-9),
                     qPrintable(u"%1 %2: %3, SciPy %4"_s.arg(mine[u"name"_s].toString(), k).arg(mine[k].toDouble()).arg(ref[k].toDouble())));
        }
        QCOMPARE(mine[u"items"_s].toInt(), ref[u"items"_s].toInt());
        // Clark's min F' from the two t's (ItemFit.h; minFPrimeByHand checks the formula).
        const double t1 = byParticipant[c].toObject()[u"t"_s].toDouble();
        const double t2 = ref[u"t"_s].toDouble();
        const double f1 = t1 * t1, f2 = t2 * t2;
        const double df1 = byParticipant[c].toObject()[u"df"_s].toDouble(), df2 = ref[u"df"_s].toDouble();
        const QJsonObject m = minF[c].toObject();
        QVERIFY(nearRelative(m[u"f"_s].toDouble(), f1 * f2 / (f1 + f2), 1e-9));
        QVERIFY(nearRelative(m[u"df2"_s].toDouble(), (f1 + f2) * (f1 + f2) / (f1 * f1 / df2 + f2 * f2 / df1), 1e-9));
    }
    // The tunes' Hotelling test over all cells, as SciPy computes it.
    const QJsonObject h = py[u"hotelling_by_item"_s].toObject();
    const QJsonObject omnibus = o[u"by_item"_s].toObject()[u"omnibus"_s].toObject();
    QVERIFY(nearRelative(omnibus[u"f"_s].toDouble(), h[u"f"_s].toDouble(), 1e-9));
    QCOMPARE(omnibus[u"df2"_s].toDouble(), h[u"df2"_s].toDouble());

}

// Each tune sung with one routine only: routine varies between items (a property of the tune) and
// vowel within them, so by item the tunes are the units of a mixed design with routine as the
// groups. Against mixed_fit_check.py (the tunes' cell means by pandas, least squares of the
// routine coding on one row per tune with numpy.linalg.lstsq, SciPy's t); a factor that varies
// within one item and between for another is refused, naming both.
void TestItemFit::designWithAFactorBetweenItems()
{
    QTemporaryDir dir;
    const QString path = dir.filePath(u"tunes.csv"_s);
    const QByteArray bytes = warmupWithTunes(true);
    QVERIFY(test::writeFile(path, bytes));
    const QString warmup = QStringLiteral(CB_SOURCE_DIR) + u"/resources/demos/warmup.json"_s;
    const QStringList base{u"fit"_s, u"--data"_s, path, u"--file"_s, warmup, u"--response"_s, u"y"_s, u"--participant"_s, u"participant"_s,
                           u"--item"_s, u"item"_s};
    const test::ProcessRun run = test::runCli(base + QStringList{u"--json"_s});
    QVERIFY2(run.exitCode == 0, run.err.constData());
    const QJsonObject o = QJsonDocument::fromJson(run.out).object();
    const QJsonArray byItem = o[u"by_item"_s].toObject()[u"coefficients"_s].toArray();
    QCOMPARE(byItem.size(), 6);

    // The same rows for the script: the tune as the unit, its routine as the group, the vowel within.
    QByteArray units = "participant,group,within,y\n";
    for (const QByteArray &line : bytes.split('\n').mid(1)) {
        const QList<QByteArray> f = line.split(',');
        if (f.size() == 6)
            units += f[1] + ',' + f[2] + ',' + f[3] + ',' + f[5] + '\n';
    }
    const QString unitsPath = dir.filePath(u"units.csv"_s);
    QVERIFY(test::writeFile(unitsPath, units));
    Eigen::MatrixXd x(2, 2);
    x << 1, -0.5, 1, 0.5; // the demo's simple coding of routine, with its intercept
    const QJsonArray rows{QJsonArray{1.0 / 3, 1.0 / 3, 1.0 / 3}, QJsonArray{-1, 1, 0}, QJsonArray{-1, 0, 1}};
    const QJsonObject request{{u"data"_s, unitsPath},
                              {u"groups"_s, QJsonArray{u"humming"_s, u"lip trills"_s}},
                              {u"within_cells"_s, QJsonArray{u"ah"_s, u"ee"_s, u"oo"_s}},
                              {u"x"_s, test::matrixJson(x)},
                              {u"rows"_s, rows},
                              {u"alpha"_s, 0.05}};
    const QJsonObject py = test::runPython(u"mixed_fit_check.py"_s, {}, QJsonDocument(request).toJson());
    QVERIFY2(!py.contains(u"error"_s), qPrintable(py[u"error"_s].toString()));
    // Row r, coefficient j of the script: the name it has in the fit.
    const QString names[3][2] = {{u"intercept"_s, u"lip trills vs humming"_s},
                                 {u"ee vs ah"_s, u"lip trills vs humming \u00d7 ee vs ah"_s},
                                 {u"oo vs ah"_s, u"lip trills vs humming \u00d7 oo vs ah"_s}};
    int compared = 0;
    for (int r = 0; r < 3; ++r)
        for (int j = 0; j < 2; ++j) {
            const QJsonObject ref = py[u"rows"_s].toArray()[r].toObject()[u"coefficients"_s].toArray()[j].toObject();
            for (const QJsonValue v : byItem) {
                const QJsonObject mine = v.toObject();
                if (mine[u"name"_s].toString() != names[r][j])
                    continue;
                for (const char16_t *key : {u"estimate", u"se", u"t", u"p", u"ci_low", u"ci_high", u"df"})
                    QVERIFY2(nearRelative(mine[QString::fromUtf16(key)].toDouble(), ref[QString::fromUtf16(key)].toDouble(), 1e-9),
                             qPrintable(names[r][j] + u" "_s + QString::fromUtf16(key)));
                QCOMPARE(mine[u"df"_s].toDouble(), 10.0); // 12 tunes in 2 groups
                ++compared;
            }
        }
    QCOMPARE(compared, 6);
    const test::ProcessRun text = test::runCli(base);
    QVERIFY2(text.outText().contains(u"By item: do the within cell means differ? Hotelling's F(2, 9) = "_s)
                 && text.outText().contains(u"over the 12 of 12 items with every within cell"_s),
             qPrintable(text.outText()));

    // Every factor between items (tune i always with routine i mod 2 and vowel i mod 3): each tune
    // is one value in its cell, and the by-item analysis is the between-groups fit of the design on
    // the tunes' means, the fit checked against SciPy elsewhere (TestDataFit), so the same numbers
    // come from `fit` on a table of those means.
    {
        QByteArray rowsCsv = "participant,item,routine,vowel,y\n";
        QHash<QString, std::pair<double, int>> sums;
        QHash<QString, QString> cellOf;
        const char *routines[] = {"humming", "lip trills"};
        const char *vowels[] = {"ah", "ee", "oo"};
        for (int p = 0; p < 16; ++p)
            for (int i = 0; i < 24; ++i) {
                if (i % 2 != p % 2)
                    continue;
                const double y = 20 + 3 * (i % 2) + 2 * (i % 3) + ((p * 13 + i * 7) % 11) * 0.5;
                const QString item = u"t%1"_s.arg(i + 1);
                const QString cell = QString::fromLatin1(routines[i % 2]) + u',' + QString::fromLatin1(vowels[i % 3]);
                rowsCsv += u"s%1,%2,%3,%4\n"_s.arg(p + 1).arg(item, cell).arg(y).toUtf8();
                sums[item].first += y;
                ++sums[item].second;
                cellOf[item] = cell;
            }
        QByteArray meansCsv = "item,routine,vowel,y\n";
        for (auto it = sums.cbegin(); it != sums.cend(); ++it)
            meansCsv += u"%1,%2,%3\n"_s.arg(it.key(), cellOf[it.key()]).arg(it->first / it->second, 0, 'g', 17).toUtf8();
        const QString meansPath = dir.filePath(u"means.csv"_s);
        QVERIFY(test::writeFile(path, rowsCsv));
        QVERIFY(test::writeFile(meansPath, meansCsv));
        const test::ProcessRun byItems = test::runCli(base + QStringList{u"--json"_s});
        QVERIFY2(byItems.exitCode == 0, byItems.err.constData());
        const test::ProcessRun onMeans = test::runCli({u"fit"_s, u"--data"_s, meansPath, u"--file"_s, warmup, u"--response"_s, u"y"_s, u"--json"_s});
        QVERIFY2(onMeans.exitCode == 0, onMeans.err.constData());
        const QJsonObject item = QJsonDocument::fromJson(byItems.out).object()[u"by_item"_s].toObject();
        const QJsonObject means = QJsonDocument::fromJson(onMeans.out).object();
        QCOMPARE(item[u"count"_s].toInt(), 24);
        QCOMPARE(item[u"omnibus"_s].toObject()[u"test"_s].toString(), u"anova"_s);
        QVERIFY(nearRelative(item[u"omnibus"_s].toObject()[u"f"_s].toDouble(), means[u"f"_s].toDouble(), 1e-9));
        int paired = 0;
        for (const QJsonValue v : item[u"coefficients"_s].toArray())
            for (const QJsonValue w : means[u"coefficients"_s].toArray())
                if (v.toObject()[u"name"_s] == w.toObject()[u"name"_s]) {
                    for (const char16_t *key : {u"estimate", u"se", u"t", u"p"})
                        QVERIFY(nearRelative(v.toObject()[QString::fromUtf16(key)].toDouble(), w.toObject()[QString::fromUtf16(key)].toDouble(), 1e-9));
                    QCOMPARE(v.toObject()[u"df"_s].toDouble(), 18.0); // 24 tunes, 6 cells
                    QCOMPARE(v.toObject()[u"items"_s].toInt(), 24);
                    ++paired;
                }
        QCOMPARE(paired, 6);
        const test::ProcessRun betweenText = test::runCli(base);
        QVERIFY2(betweenText.outText().contains(u"By item: do the cell means differ? F(5, 18) = "_s)
                     && betweenText.outText().contains(u"over the 24 items, each in one cell"_s),
                 qPrintable(betweenText.outText()));
    }

    // One tune heard with both routines among tunes tied to one: refused, naming both.
    QVERIFY(test::writeFile(path, bytes + "s2,t1,lip trills,ee,lip trills\u00b7ee,30\n"));
    const test::ProcessRun mixedUp = test::runCli(base);
    QCOMPARE(mixedUp.exitCode, 2);
    QVERIFY2(mixedUp.errText().contains(u"factor 'routine' varies within item 't1'"_s)
                 && mixedUp.errText().contains(u"but between items for item 't3' (column 'item', first on line 3)"_s),
             mixedUp.err.constData());
}

QTEST_GUILESS_MAIN(TestItemFit)
#include "TestItemFit.moc"
