// Designs with empty cells (core/analysis/EmptyCells, analyzeDesign, fitDesign, the command line).
// Every hypothesis row is derived by hand beside its check, and every case is also held to NumPy
// (tests/python/empty_cells_check.py: matrix_rank of the design rows over the cells with
// observations, the row-space test for each coefficient, pinv of the n-weighted rows; and
// tests/python/fit_lstsq.py for the fit, lstsq on the explicit N-row design).
#include "core/analysis/DesignAnalysis.h"
#include "core/data/DataReader.h"
#include "core/data/DesignFit.h"
#include "core/files/StudyFile.h"
#include "core/model/Design.h"

#include "tests/support/FitTestSupport.h"
#include "tests/support/ProcessRunner.h"

#include <QJsonArray>
#include <QJsonDocument>
#include <QJsonObject>
#include <QTemporaryDir>
#include <QTest>

using namespace Qt::StringLiterals;
using namespace cb;

Q_DECLARE_METATYPE(cb::Design)

namespace {

// A factor coded by custom columns: "a1 a2" and "-1/2 1/2" (columns separated by ';').
Scheme coded(const QString &name, const QString &levels, const QString &columns)
{
    Scheme s;
    s.kind = SchemeKind::Custom;
    s.factor.name = name;
    s.factor.levels = levels.split(u' ');
    const QStringList cols = columns.split(u';');
    for (qsizetype c = 0; c < cols.size(); ++c) {
        Column col{u"%1%2"_s.arg(name).arg(c + 1), {}};
        for (const QString &w : cols[c].split(u' '))
            col.weights.push_back(parseWeight(w).value());
        s.columns.push_back(col);
    }
    return s;
}

std::vector<Rational> sizes(std::initializer_list<int> n)
{
    std::vector<Rational> out;
    for (int v : n)
        out.emplace_back(v);
    return out;
}

// "7/9 2/9 0 ..." as exact weights.
std::vector<Weight> weights(const QString &text)
{
    std::vector<Weight> out;
    for (const QString &w : text.split(u' '))
        out.push_back(parseWeight(w).value());
    return out;
}

Design hedgerow(bool interaction)
{
    QFile f(QStringLiteral(CB_SOURCE_DIR "/resources/demos/hedgerow.json"));
    if (!f.open(QIODevice::ReadOnly))
        return {};
    Design d = studyFromJson(f.readAll(), u"hedgerow.json"_s).value().design;
    if (!interaction)
        d.terms.pop_back();
    d.cellN = sizes({6, 6, 6, 0, 6, 4}); // grass·late empty (the demo plans 5 there)
    return d;
}

// A matrix as rows of numbers, for the Python scripts.
QJsonArray matrixJson(const Eigen::MatrixXd &m)
{
    QJsonArray out;
    for (Eigen::Index r = 0; r < m.rows(); ++r) {
        QJsonArray row;
        for (Eigen::Index c = 0; c < m.cols(); ++c)
            row.append(m(r, c));
        out.append(row);
    }
    return out;
}

QJsonObject numpy(const Design &d)
{
    QJsonArray n;
    for (const Rational &v : d.cellN)
        n.append(v.get_d());
    const QJsonObject request{{u"cases"_s, QJsonArray{QJsonObject{{u"X"_s, matrixJson(designRows(cellScheme(d).value()))}, {u"n"_s, n}}}}};
    const QJsonObject out = test::runPython(u"empty_cells_check.py"_s, {}, QJsonDocument(request).toJson());
    return out.value(u"cases"_s).toArray().first().toObject();
}

bool rowsAgree(const std::vector<Weight> &row, const QJsonArray &ref)
{
    if (row.size() != size_t(ref.size()))
        return false;
    for (size_t c = 0; c < row.size(); ++c)
        if (std::abs(row[c].value() - ref[qsizetype(c)].toDouble()) > 1e-12)
            return false;
    return true;
}

// The analysis and NumPy agree on the rank, on each row over the cells with observations, and on
// each row of the full design the analysis compares with.
void checkAgainstNumpy(const Design &d, const DesignAnalysis &da)
{
    const QJsonObject ref = numpy(d);
    QVERIFY2(!ref.isEmpty(), "empty_cells_check.py gave no answer");
    QCOMPARE(ref[u"rank"_s].toInt(), da.empty.rank);
    const QJsonArray h = ref[u"hypotheses"_s].toArray();
    QCOMPARE(qsizetype(da.analysis.hypotheses.size()), h.size());
    for (int j = 0; j < int(h.size()); ++j)
        QVERIFY2(rowsAgree(da.rowOverCells(j), h[j].toArray()), qPrintable(u"row %1"_s.arg(j)));
    const QJsonArray full = ref[u"full"_s].toArray();
    for (const HypothesisShift &s : da.empty.shifts)
        QVERIFY2(rowsAgree(s.beforeRow, full[s.coefficient].toArray()), qPrintable(u"full row %1"_s.arg(s.coefficient)));
}

QString labels(const std::vector<HypothesisShift> &shifts)
{
    QStringList out;
    for (const HypothesisShift &s : shifts)
        out << s.label;
    return out.join(u", "_s);
}

} // namespace

class TestEmptyCells : public QObject
{
    Q_OBJECT
private slots:
    void hedgerowMainEffectsWithOneEmptyCell();
    void centredTwoByTwoLosesOneCell();
    void coefficientAwayFromTheEmptyCellIsUnchanged();
    void notEstimable_data();
    void notEstimable();
    void badInput();
    void fitLeavesOutCellsWithoutData();
    void commandLine();
    void powerAndExportOverTheCellsWithObservations();
};

// The hedgerow demo (margin: bare, grass, wildflower, treatment coding with bare the reference;
// mowing: early, late, reference early), main effects only, with grass·late empty and the other
// cells at n = 6, 6, 6, 6, 4 (bare·early, bare·late, grass·early, wildflower·early,
// wildflower·late). Derivation: the grass column is 1 only at grass·early, so b1 fits that cell
// exactly (b1 = grass·early - b0), and the other four cells form an additive 2 x 2 (bare,
// wildflower x early, late) with n 6, 6, 6, 4. Its weighted least-squares residual at cell ij is
// s_ij I / (n_ij sum 1/n), I = be - bl - we + wl the interaction, s = +, -, -, +, sum 1/n = 3/4; so
// fitted be = be - 2I/9, bl = bl + 2I/9, we = we + 2I/9, wl = wl - I/3. Then
//   b0 = fitted be = (7 be + 2 bl + 2 we - 2 wl)/9
//   b1 = ge - b0
//   b2 = fitted we - fitted be = (-5 be - 4 bl + 5 we + 4 wl)/9
//   b3 = fitted bl - fitted be = (-5 be + 5 bl - 4 we + 4 wl)/9
// (cells in the design's order be, bl, ge, gl, we, wl; 0 at the empty gl).
void TestEmptyCells::hedgerowMainEffectsWithOneEmptyCell()
{
    const Design d = hedgerow(false);
    QCOMPARE(d.factors.size(), size_t(2));
    const DesignAnalysis da = analyzeDesign(d);
    QVERIFY(!da.refused());
    QVERIFY(da.empty.estimable);
    QCOMPARE(da.emptyCells, QStringList{u"grass\u00b7late"_s});
    QCOMPARE(da.analysis.levels.size(), 5);
    QCOMPARE(da.empty.rank, 4);
    QVERIFY(da.rowOverCells(0) == weights(u"7/9 2/9 0 0 2/9 -2/9"_s));
    QVERIFY(da.rowOverCells(1) == weights(u"-7/9 -2/9 1 0 -2/9 2/9"_s));
    QVERIFY(da.rowOverCells(2) == weights(u"-5/9 -4/9 0 0 5/9 4/9"_s));
    QVERIFY(da.rowOverCells(3) == weights(u"-5/9 5/9 0 0 -4/9 4/9"_s));
    // Each coefficient weighed grass·late in the full design (the empty cell at the mean size of
    // the others, 28/5): all four change.
    QCOMPARE(da.empty.fullCellN, u"28/5"_s);
    QCOMPARE(labels(da.empty.shifts), u"b0 intercept, b1 grass vs bare, b2 wildflower vs bare, b3 late vs early"_s);
    const HypothesisShift &late = da.empty.shifts[3];
    QCOMPARE(late.after, u"(5 bare\u00b7late + 4 wildflower\u00b7late)/9 - (5 bare\u00b7early + 4 wildflower\u00b7early)/9"_s);
    QCOMPARE(late.emptyWeights, QStringList{u"grass\u00b7late 140/401"_s});
    QVERIFY2(late.words.startsWith(u"b3 late vs early (mowing) now tests (5 bare\u00b7late + 4 wildflower\u00b7late)/9"_s), qPrintable(late.words));
    QVERIFY2(late.words.contains(u"bare\u00b7late 145/401 \u2192 5/9"_s), qPrintable(late.words));
    QVERIFY(da.empty.unchanged.isEmpty());
    // The health is over the five cells, and the findings say so.
    QVERIFY(da.analysis.fullRank);
    QVERIFY(da.analysis.conditionNumber.has_value());
    bool told = false;
    for (const Finding &f : da.analysis.findings)
        told = told || f.message.startsWith(u"the hypotheses and the design's health are over the 5 cells with observations (without grass\u00b7late)"_s);
    QVERIFY(told);
    checkAgainstNumpy(d, da);
}

// A 2 x 2 with centred +-1/2 coding, main effects only, n = 10 everywhere except a1·b2 empty.
// Three cells, three coefficients: X_r is square and H = X_r^-1, whatever the sizes. From
// a1·b1 = b0 - A/2 - B/2, a2·b1 = b0 + A/2 - B/2, a2·b2 = b0 + A/2 + B/2:
//   A = a2·b1 - a1·b1 (the simple effect at b1), B = a2·b2 - a2·b1 (at a2),
//   b0 = (a1·b1 + a2·b2)/2.
// The full design (a1·b2 at 10, balanced): b0 the mean of the four, A = (a2·b1 + a2·b2)/2 -
// (a1·b1 + a1·b2)/2, B = (a1·b2 + a2·b2)/2 - (a1·b1 + a2·b1)/2.
void TestEmptyCells::centredTwoByTwoLosesOneCell()
{
    Design d;
    d.factors = {coded(u"A"_s, u"a1 a2"_s, u"-1/2 1/2"_s), coded(u"B"_s, u"b1 b2"_s, u"-1/2 1/2"_s)};
    d.terms = {Term{{0}, -1}, Term{{1}, -1}};
    d.cellN = sizes({10, 0, 10, 10});
    const DesignAnalysis da = analyzeDesign(d);
    QVERIFY(da.empty.estimable);
    QVERIFY(!da.analysis.dependsOnSizes); // saturated over the three cells
    QVERIFY(da.rowOverCells(0) == weights(u"1/2 0 0 1/2"_s));
    QVERIFY(da.rowOverCells(1) == weights(u"-1 0 1 0"_s));
    QVERIFY(da.rowOverCells(2) == weights(u"0 0 -1 1"_s));
    QCOMPARE(da.empty.fullCellN, u"10"_s);
    QCOMPARE(da.empty.shifts.size(), size_t(3));
    QVERIFY(da.empty.shifts[1].beforeRow == weights(u"-1/2 -1/2 1/2 1/2"_s));
    QCOMPARE(da.empty.shifts[1].emptyWeights, QStringList{u"a1\u00b7b2 \u22121/2"_s});
    QCOMPARE(da.empty.shifts[1].reweighted,
             (QStringList{u"a1\u00b7b1 \u22121/2 \u2192 \u22121"_s, u"a2\u00b7b1 1/2 \u2192 1"_s, u"a2\u00b7b2 1/2 \u2192 0"_s}));
    QCOMPARE(da.empty.shifts[1].after, u"a2\u00b7b1 - a1\u00b7b1"_s);
    checkAgainstNumpy(d, da);
}

// A 3 x 2, treatment coding (references a1 and b1), main effects, n = 10 everywhere but a3·b2
// empty. a3 then appears only at b1, so A3 fits a3·b1 exactly and the rest is the balanced
// additive 2 x 2 of a1, a2 x b1, b2: fitted a1·b1 = row mean + column mean - grand mean.
//   b0 = (3 a1b1 + a1b2 + a2b1 - a2b2)/4,  A2 = (a2b1 + a2b2 - a1b1 - a1b2)/2,
//   A3 = a3b1 - b0,  B = (a1b2 + a2b2 - a1b1 - a2b1)/2.
// The full balanced 3 x 2: A2 = (a2b1 + a2b2 - a1b1 - a1b2)/2 as well (unchanged), while
// B = (a1b2 + a2b2 + a3b2 - a1b1 - a2b1 - a3b1)/3 and b0 = 2/3 a1b1 + 1/3 a1b2 + 1/6 (a2b1 + a3b1 -
// a2b2 - a3b2) change.
void TestEmptyCells::coefficientAwayFromTheEmptyCellIsUnchanged()
{
    Design d;
    d.factors = {coded(u"A"_s, u"a1 a2 a3"_s, u"0 1 0;0 0 1"_s), coded(u"B"_s, u"b1 b2"_s, u"0 1"_s)};
    d.terms = {Term{{0}, -1}, Term{{1}, -1}};
    d.cellN = sizes({10, 10, 10, 10, 10, 0});
    const DesignAnalysis da = analyzeDesign(d);
    QVERIFY(da.empty.estimable);
    // cells a1b1, a1b2, a2b1, a2b2, a3b1, a3b2
    QVERIFY(da.rowOverCells(0) == weights(u"3/4 1/4 1/4 -1/4 0 0"_s));
    QVERIFY(da.rowOverCells(1) == weights(u"-1/2 -1/2 1/2 1/2 0 0"_s));
    QVERIFY(da.rowOverCells(2) == weights(u"-3/4 -1/4 -1/4 1/4 1 0"_s));
    QVERIFY(da.rowOverCells(3) == weights(u"-1/2 1/2 -1/2 1/2 0 0"_s));
    QCOMPARE(da.empty.unchanged, QStringList{u"b1 A1"_s});
    QCOMPARE(labels(da.empty.shifts), u"b0 intercept, b2 A2, b3 B1"_s);
    QVERIFY(da.empty.shifts[0].beforeRow == weights(u"2/3 1/3 1/6 -1/6 1/6 -1/6"_s));
    QVERIFY(da.empty.shifts[2].beforeRow == weights(u"-1/3 1/3 -1/3 1/3 -1/3 1/3"_s));
    QVERIFY2(da.empty.summary.contains(u"changes what 3 of 4 coefficients test"_s), qPrintable(da.empty.summary));
    QVERIFY2(da.empty.summary.endsWith(u"unchanged: b1 A1"_s), qPrintable(da.empty.summary));
    checkAgainstNumpy(d, da);
}

void TestEmptyCells::notEstimable_data()
{
    QTest::addColumn<Design>("design");
    QTest::addColumn<QStringList>("unestimable");
    QTest::addColumn<QStringList>("leaveOut");
    QTest::addColumn<QString>("refusal");
    const Scheme a = coded(u"A"_s, u"a1 a2"_s, u"0 1"_s), b = coded(u"B"_s, u"b1 b2"_s, u"0 1"_s);
    const Scheme ac = coded(u"A"_s, u"a1 a2"_s, u"-1/2 1/2"_s), bc = coded(u"B"_s, u"b1 b2"_s, u"-1/2 1/2"_s);
    // Treatment coding, full factorial, a2·b2 empty: the interaction column A1 × B1 is 1 at a2·b2
    // and 0 elsewhere, so it has no support; the other three columns are the cell-means coding of
    // the three remaining cells. Leaving out A × B is the only single fix (without A the columns
    // 1, B1, A1 × B1 over a1b1, a1b2, a2b1 are 1 0 0 / 1 1 0 / 1 0 0: rank 2).
    Design t;
    t.factors = {a, b};
    t.terms = Design::fullFactorial(2);
    t.cellN = sizes({5, 5, 5, 0});
    QTest::newRow("treatment 2 x 2, interaction only in the empty cell")
        << t << QStringList{u"b3 A1 \u00d7 B1"_s} << QStringList{u"A \u00d7 B"_s}
        << u"empty cell (planned n = 0): a2\u00b7b2. The chosen terms cannot be estimated from the 3 cells with observations (rank 3 for 4 "
           "coefficients). Not estimable: b3 A1 \u00d7 B1 (term A \u00d7 B; its only non-zero weights are in the empty cell). Leave "
           "out the term A \u00d7 B: the other terms can be estimated without it"_s;
    // Centred coding, full factorial, a1·b2 empty: rows (1, A, B, AB) at a1b1, a2b1, a2b2 are
    // (1, -1/2, -1/2, 1/4), (1, 1/2, -1/2, -1/4), (1, 1/2, 1/2, 1/4). X_r v = 0: the second row minus
    // the first gives v1 = v3/2, the third minus the second v2 = -v3/2, and the first then v0 = -v3/4,
    // so v = (-1, 2, -2, 4): non-zero at every coefficient, none can be estimated. Leaving out
    // A × B, A or B each leaves three independent columns over three cells.
    Design c;
    c.factors = {ac, bc};
    c.terms = Design::fullFactorial(2);
    c.cellN = sizes({5, 0, 5, 5});
    QTest::newRow("centred 2 x 2, one empty cell")
        << c << QStringList{u"b0 intercept"_s, u"b1 A1"_s, u"b2 B1"_s, u"b3 A1 \u00d7 B1"_s}
        << QStringList{u"A \u00d7 B"_s, u"A"_s, u"B"_s}
        << u"empty cell (planned n = 0): a1\u00b7b2. The chosen terms cannot be estimated from the 3 cells with observations (rank 3 for 4 "
           "coefficients). Not estimable: b0 intercept (the constant); b1 A1 (term A); b2 B1 (term B); b3 A1 \u00d7 B1 (term "
           "A \u00d7 B). Leave out the term A \u00d7 B (or one of A, B): the other terms can be estimated without it"_s;
    // Main effects, only a1·b1 observed: three coefficients, one cell; no single term is enough.
    Design m;
    m.factors = {ac, bc};
    m.terms = {Term{{0}, -1}, Term{{1}, -1}};
    m.cellN = sizes({5, 0, 0, 0});
    QTest::newRow("main effects, one cell left")
        << m << QStringList{u"b0 intercept"_s, u"b1 A1"_s, u"b2 B1"_s} << QStringList{}
        << u"empty cells (planned n = 0): a1\u00b7b2, a2\u00b7b1, a2\u00b7b2. The chosen terms cannot be estimated from the 1 cell "
           "with observations (rank 1 for 3 coefficients). Not estimable: b0 intercept (the constant); b1 A1 (term A); b2 B1 (term B). No single "
           "term can be left out to fix this: leave out several terms, or give the empty cells observations"_s;
}

void TestEmptyCells::notEstimable()
{
    QFETCH(Design, design);
    QFETCH(QStringList, unestimable);
    QFETCH(QStringList, leaveOut);
    QFETCH(QString, refusal);
    const DesignAnalysis da = analyzeDesign(design);
    QVERIFY(da.refused());
    QVERIFY(!da.empty.estimable);
    QStringList lost;
    for (const UnestimableCoefficient &u : da.empty.unestimable)
        lost << u.label;
    QCOMPARE(lost, unestimable);
    QCOMPARE(da.empty.leaveOut, leaveOut);
    QCOMPARE(da.empty.refusal, refusal);
    QCOMPARE(da.analysis.findings.size(), size_t(1));
    QCOMPARE(da.analysis.findings.front().message, refusal);
    // NumPy: the same rank, and the same coefficients outside X_r's row space.
    const QJsonObject ref = numpy(design);
    QCOMPARE(ref[u"rank"_s].toInt(), da.empty.rank);
    const QJsonArray estimable = ref[u"estimable"_s].toArray();
    int notEstimable = 0;
    for (int j = 0; j < int(estimable.size()); ++j) {
        const bool lostHere = std::any_of(da.empty.unestimable.begin(), da.empty.unestimable.end(),
                                          [j](const UnestimableCoefficient &u) { return u.coefficient == j; });
        QCOMPARE(lostHere, !estimable[j].toBool());
        notEstimable += lostHere ? 1 : 0;
    }
    QCOMPARE(notEstimable, int(unestimable.size()));
    // Leaving out the suggested term makes it estimable.
    if (!leaveOut.isEmpty()) {
        Design fixed = design;
        std::erase_if(fixed.terms, [&](const Term &t) { return termName(fixed, t) == leaveOut.front(); });
        QVERIFY(analyzeDesign(fixed).empty.estimable);
    }
}

void TestEmptyCells::badInput()
{
    Design d = hedgerow(false);
    // Every cell empty: refused, nothing to estimate (no decomposition of an empty matrix).
    d.cellN = sizes({0, 0, 0, 0, 0, 0});
    DesignAnalysis da = analyzeDesign(d);
    QVERIFY(da.refused());
    QCOMPARE(da.empty.refusal, u"every cell is empty (planned n = 0): there is nothing to estimate; give the cells observations"_s);
    // A negative size is refused by the design's own check, naming the cell.
    d.cellN = sizes({6, -1, 6, 6, 6, 6});
    da = analyzeDesign(d);
    QVERIFY(da.refused());
    QCOMPARE(da.analysis.findings.front().message, u"design.cell_n[1]: negative size -1; sizes must be 0 (an empty cell) or more"_s);
    // A design file with an empty cell and a non-estimable term, on the command line: exit 2,
    // the file named.
    QTemporaryDir dir;
    const QString path = dir.filePath(u"plan.json"_s);
    QVERIFY(test::writeFile(path, designToJson(hedgerow(true))));
    const test::ProcessRun run = test::runCli({u"analyze"_s, u"--file"_s, path});
    QCOMPARE(run.exitCode, 2);
    QVERIFY2(run.errText().contains(path + u": empty cell (planned n = 0): grass\u00b7late. The chosen terms cannot be estimated"_s),
             run.err.constData());
    QVERIFY2(run.errText().contains(u"Leave out the term margin \u00d7 mowing"_s), run.err.constData());
    QVERIFY(run.out.isEmpty());
    // Data with every row in one cell: refused, naming the data and the empty cells.
    const QString data = dir.filePath(u"one.csv"_s);
    QVERIFY(test::writeFile(data, "margin,mowing,visits\nbare,early,3\nbare,early,4\n"));
    const test::ProcessRun one = test::runCli({u"fit"_s, u"--file"_s, path, u"--data"_s, data, u"--response"_s, u"visits"_s});
    QCOMPARE(one.exitCode, 2);
    QVERIFY2(one.errText().contains(data + u": empty cells (no rows in the data): bare\u00b7late, grass\u00b7early"_s), one.err.constData());
    // A data cell that is not in the design is named as such before any cell counts as empty.
    QVERIFY(test::writeFile(data, "margin,mowing,visits\nbare,early,3\nhedge,early,4\n"));
    const test::ProcessRun stray = test::runCli({u"fit"_s, u"--file"_s, path, u"--data"_s, data, u"--response"_s, u"visits"_s});
    QCOMPARE(stray.exitCode, 2);
    QVERIFY2(stray.errText().contains(u"in the data but not in the scheme: 'hedge\u00b7early'"_s), stray.err.constData());
}

// The data decide: grass·late has no rows, so the main-effects fit runs over the other five cells
// at the observed sizes, and agrees with NumPy's lstsq on the N-row design over those cells.
void TestEmptyCells::fitLeavesOutCellsWithoutData()
{
    QByteArray csv = "margin,mowing,visits\n";
    const char *cells[][2] = {{"bare", "early"}, {"bare", "late"}, {"grass", "early"}, {"wildflower", "early"}, {"wildflower", "late"}};
    const int n[] = {6, 6, 6, 6, 4};
    for (int c = 0; c < 5; ++c)
        for (int i = 0; i < n[c]; ++i)
            csv += QByteArray(cells[c][0]) + ',' + cells[c][1] + ',' + QByteArray::number(10 + 3 * c + (i * 7 + c) % 5) + '\n';
    QTemporaryDir dir;
    const QString path = dir.filePath(u"visits.csv"_s);
    QVERIFY(test::writeFile(path, csv));
    DataReadOptions o;
    o.factorColumn = u"margin"_s;
    o.moreFactorColumns = {u"mowing"_s};
    o.responseColumn = u"visits"_s;
    const auto data = readLevelData(path, o);
    QVERIFY2(data.ok(), qPrintable(data.error()));
    Design d = hedgerow(false);
    d.cellN.clear(); // planned equal: the data's missing cell is what empties it
    const auto fit = fitDesign(d, *data);
    QVERIFY2(fit.ok(), qPrintable(fit.error()));
    QCOMPARE(fit->design.emptyCells, QStringList{u"grass\u00b7late"_s});
    QCOMPARE(fit->design.empty.why, u"no rows in the data"_s);
    QCOMPARE(fit->fit.levels.size(), 5);
    QVERIFY(fit->fit.hypothesesAgree); // the hypotheses are at the observed sizes
    // Observed sizes are the hand-derived case's: the same rows.
    QVERIFY(fit->design.rowOverCells(3) == weights(u"-5/9 5/9 0 0 -4/9 4/9"_s));
    QVERIFY2(fit->fit.notes.front().startsWith(u"the empty cell grass\u00b7late (no rows in the data) changes what 4 of 4"_s),
             qPrintable(fit->fit.notes.front()));

    const QJsonObject spec{{u"csv"_s, path},
                           {u"factors"_s, QJsonArray{u"margin"_s, u"mowing"_s}},
                           {u"response"_s, u"visits"_s},
                           {u"weight"_s, QJsonValue()},
                           {u"levels"_s, QJsonArray::fromStringList(fit->design.cellScheme.factor.levels)},
                           {u"X"_s, matrixJson(designRows(fit->design.cellScheme))},
                           {u"intercept"_s, true},
                           {u"alpha"_s, 0.05}};
    const QJsonObject ref = test::runPython(u"fit_lstsq.py"_s, {}, QJsonDocument(spec).toJson());
    QVERIFY2(!ref.contains(u"error"_s), qPrintable(ref.value(u"error"_s).toString()));
    const QJsonArray estimates = ref[u"coefficients"_s].toArray(), se = ref[u"se"_s].toArray();
    QCOMPARE(estimates.size(), qsizetype(4));
    for (int j = 0; j < 4; ++j) {
        QVERIFY(std::abs(fit->fit.coefficients[size_t(j)].estimate - estimates[j].toDouble()) < 1e-9);
        QVERIFY(std::abs(fit->fit.coefficients[size_t(j)].se - se[j].toDouble()) < 1e-9);
    }
    QVERIFY(std::abs(fit->fit.sigma - ref[u"sigma"_s].toDouble()) < 1e-9);
    QCOMPARE(fit->fit.df, ref[u"df"_s].toDouble());
}

// analyze --json gains the new keys (the old ones stay); fit --json the same, from the data.
void TestEmptyCells::commandLine()
{
    QTemporaryDir dir;
    const QString path = dir.filePath(u"plan.json"_s);
    QVERIFY(test::writeFile(path, designToJson(hedgerow(false))));
    const test::ProcessRun run = test::runCli({u"analyze"_s, u"--file"_s, path, u"--json"_s});
    QCOMPARE(run.exitCode, 0);
    const QJsonObject o = QJsonDocument::fromJson(run.out).object();
    QCOMPARE(o[u"empty_cells"_s].toArray().size(), 1);
    QCOMPARE(o[u"levels"_s].toArray().size(), 5); // the analysed cells
    QCOMPARE(o[u"cells"_s].toArray().size(), 6);
    QVERIFY(o[u"estimable"_s].toBool());
    QCOMPARE(o[u"empty_cells_reason"_s].toString(), u"planned n = 0"_s);
    const QJsonArray changed = o[u"changed_hypotheses"_s].toArray();
    QCOMPARE(changed.size(), 4);
    const QJsonObject late = changed[3].toObject();
    QCOMPARE(late[u"label"_s].toString(), u"b3 late vs early"_s);
    QCOMPARE(late[u"term"_s].toString(), u"mowing"_s);
    QCOMPARE(late[u"weights"_s].toArray()[1].toDouble(), 5.0 / 9.0);
    QCOMPARE(late[u"full_design_weights"_s].toArray()[3].toDouble(), 140.0 / 401.0);
    QVERIFY(o.contains(u"hypotheses"_s) && o.contains(u"condition_number"_s));
    const test::ProcessRun text = test::runCli({u"analyze"_s, u"--file"_s, path});
    QVERIFY2(text.outText().contains(u"Empty cells (planned n = 0): grass\u00b7late; analysed over the other cells\n"_s), text.out.constData());
    QVERIFY2(text.outText().contains(u"  b3 late vs early (mowing) now tests"_s), text.out.constData());

    const QString data = dir.filePath(u"d.csv"_s);
    QVERIFY(test::writeFile(data, "margin,mowing,visits\nbare,early,3\nbare,early,5\nbare,late,4\nbare,late,6\ngrass,early,8\n"
                                  "grass,early,9\nwildflower,early,7\nwildflower,early,8\nwildflower,late,12\nwildflower,late,10\n"));
    const test::ProcessRun fit = test::runCli({u"fit"_s, u"--file"_s, path, u"--data"_s, data, u"--response"_s, u"visits"_s, u"--json"_s});
    QCOMPARE(fit.exitCode, 0);
    const QJsonObject f = QJsonDocument::fromJson(fit.out).object();
    QCOMPARE(f[u"coefficients"_s].toArray().size(), 4);
    QCOMPARE(f[u"empty_cells"_s].toArray().first().toString(), u"grass\u00b7late"_s);
    QCOMPARE(f[u"empty_cells_reason"_s].toString(), u"no rows in the data"_s);
    // Two rows in each of the five cells: the full design it is compared with is balanced, and there
    // wildflower vs bare is (wildflower·early + wildflower·late)/2 - (bare·early + bare·late)/2, from
    // the two complete rows of the table, with or without grass·late: unchanged.
    QCOMPARE(f[u"changed_hypotheses"_s].toArray().size(), 3);
    QCOMPARE(f[u"unchanged_hypotheses"_s].toArray(), QJsonArray{u"b2 wildflower vs bare"_s});
    QVERIFY(f[u"notes"_s].toArray().first().toString().contains(u"changes what 3 of 4 coefficients test"_s));
}

// power and export take a design with an empty cell as the window does (analyzeDesign's
// cellScheme): over the five cells with observations. By hand, from the hypotheses derived above
// (hedgerowMainEffectsWithOneEmptyCell): b3 late vs early is (-5 be + 5 bl - 4 we + 4 wl)/9, so with
// means be = 10, bl = 12, ge = 14, we = 13, wl = 15 its estimate is (-50 + 60 - 52 + 60)/9 = 2, and
// with SD 4 and n = 6, 6, 6, 6, 4 its SE is 4 sqrt((25 + 25 + 16)/(81 * 6) + 16/(81 * 4)) =
// 4 sqrt(5/27). With the interaction the terms cannot be estimated: refused with the reason; and
// a design with a factor measured within participants needs every cell.
void TestEmptyCells::powerAndExportOverTheCellsWithObservations()
{
    QTemporaryDir dir;
    const QString path = dir.filePath(u"plan.json"_s);
    QVERIFY(test::writeFile(path, designToJson(hedgerow(false))));
    const test::ProcessRun power = test::runCli({u"power"_s, u"--file"_s, path, u"--means"_s, u"10,12,14,13,15"_s, u"--sd"_s, u"4"_s, u"--json"_s});
    QVERIFY2(power.exitCode == 0, power.err.constData());
    const QJsonObject o = QJsonDocument::fromJson(power.out).object();
    const QStringList kept{u"bare\u00b7early"_s, u"bare\u00b7late"_s, u"grass\u00b7early"_s, u"wildflower\u00b7early"_s, u"wildflower\u00b7late"_s};
    QCOMPARE(o[u"level_names"_s].toArray(), QJsonArray::fromStringList(kept));
    const QJsonArray contrasts = o[u"contrasts"_s].toArray();
    QCOMPARE(contrasts.size(), 3);
    const QJsonObject late = contrasts[2].toObject();
    QCOMPARE(late[u"name"_s].toString(), u"late vs early"_s);
    const double expected[] = {-5.0 / 9.0, 5.0 / 9.0, 0.0, -4.0 / 9.0, 4.0 / 9.0};
    for (int i = 0; i < 5; ++i)
        QVERIFY(std::abs(late[u"weights"_s].toArray()[i].toDouble() - expected[i]) < 1e-12);
    QVERIFY(std::abs(late[u"estimate"_s].toDouble() - 2.0) < 1e-12);
    QVERIFY(std::abs(late[u"se"_s].toDouble() - 4.0 * std::sqrt(5.0 / 27.0)) < 1e-12);
    QVERIFY2(o[u"notes"_s].toArray().at(1).toString().startsWith(u"empty cells (cell_n 0) are left out, so give means for the other 5 cells"_s),
             qPrintable(o[u"notes"_s].toArray().at(1).toString()));
    const test::ProcessRun sixMeans = test::runCli({u"power"_s, u"--file"_s, path, u"--means"_s, u"10,12,14,0,13,15"_s, u"--sd"_s, u"4"_s});
    QCOMPARE(sixMeans.exitCode, 2);
    QVERIFY2(sixMeans.errText().contains(u"6 values for 5 levels"_s), sixMeans.err.constData());

    const test::ProcessRun csv = test::runCli({u"export"_s, u"--file"_s, path, u"--format"_s, u"csv"_s});
    QVERIFY2(csv.exitCode == 0, csv.err.constData());
    const QStringList lines = csv.outText().trimmed().split(u"\r\n"_s); // RFC 4180 line ends
    QCOMPARE(lines.size(), 6); // the header and the five cells with observations
    QCOMPARE(lines[4], u"wildflower\u00b7early,0,1,0"_s);
    QVERIFY(!csv.outText().contains(u"grass\u00b7late"_s));

    const QString full = dir.filePath(u"full.json"_s);
    QVERIFY(test::writeFile(full, designToJson(hedgerow(true))));
    for (const QString &command : {u"power"_s, u"export"_s}) {
        QStringList args{command, u"--file"_s, full};
        args << (command == u"power"_s ? QStringList{u"--means"_s, u"1,2,3,4,5"_s, u"--sd"_s, u"1"_s} : QStringList{u"--format"_s, u"csv"_s});
        const test::ProcessRun refused = test::runCli(args);
        QCOMPARE(refused.exitCode, 2);
        QVERIFY2(refused.errText().contains(u"The chosen terms cannot be estimated from the"_s), refused.err.constData());
    }

    QFile demo(QStringLiteral(CB_SOURCE_DIR "/resources/demos/warmup.json"));
    QVERIFY(demo.open(QIODevice::ReadOnly));
    Design warmup = studyFromJson(demo.readAll(), u"warmup.json"_s).value().design;
    warmup.cellN = sizes({12, 12, 12, 0, 0, 0});
    const QString mixed = dir.filePath(u"mixed.json"_s);
    QVERIFY(test::writeFile(mixed, designToJson(warmup)));
    const test::ProcessRun within = test::runCli({u"power"_s, u"--file"_s, mixed, u"--means"_s, u"1,2,3,4,5,6"_s, u"--sd"_s, u"1"_s});
    QCOMPARE(within.exitCode, 2);
    QVERIFY2(within.errText().contains(u"with a factor measured within participants power needs every cell"_s), within.err.constData());
}

QTEST_GUILESS_MAIN(TestEmptyCells)
#include "TestEmptyCells.moc"
