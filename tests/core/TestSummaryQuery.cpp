// The summary query's two-level form in core (core/data/SummaryQuery): the SQL it writes (the
// participant grouped, quoted and returned last; the sum of squares instead of the variance) and
// participantSummaryFromRows, which turns an engine's rows into the data fitParticipants reads.
// Check values are small cases worked by hand (written beside each); the engines' own answers
// are compared with fit --data in tests/cli/TestDatabaseFit, TestDatabasePostgres, TestDatabaseOdbc.
#include "core/data/SummaryQuery.h"

#include <QTest>

using namespace Qt::StringLiterals;
using namespace cb;

class TestSummaryQuery : public QObject
{
    Q_OBJECT

private slots:
    void twoLevelQueryGroupsByTheParticipant()
    {
        SummaryQuerySpec spec;
        spec.table = u"trials"_s;
        spec.factorColumns = {u"cue"_s};
        spec.responseColumn = u"rt"_s;
        spec.participantColumn = u"who\"; DROP TABLE trials; --"_s;
        const auto q = summaryQuery(spec);
        QVERIFY2(q.ok(), qPrintable(q.error()));
        const QString quoted = u"d.\"who\"\"; DROP TABLE trials; --\""_s;
        QVERIFY(q->sql.contains(u"GROUP BY d.\"cue\", %1, p.\"centre\""_s.arg(quoted)));
        QVERIFY(q->sql.contains(u"CAST(%1 AS VARCHAR(1000)) AS \"participant\""_s.arg(quoted)));
        QVERIFY(q->sql.contains(u" AS \"ss\""_s));
        QVERIFY(!q->sql.contains(u"AS \"variance\""_s));
        QVERIFY(q->sql.endsWith(u"ORDER BY \"participant\", \"level\""_s));
        QCOMPARE(summaryQueryColumns(true), (QStringList{u"level"_s, u"n"_s, u"mean"_s, u"ss"_s, u"participant"_s}));
        spec.form = VarianceForm::Engine;
        QVERIFY(summaryQuery(spec)->sql.contains(u"COALESCE(VAR_SAMP(d.\"rt\") * (COUNT(*) - 1), 0) AS \"ss\""_s));
        spec.participantColumn = u"cue"_s;
        const auto refused = summaryQuery(spec);
        QVERIFY(!refused.ok());
        QCOMPARE(refused.field(), u"participant"_s);
        QVERIFY(refused.error().startsWith(u"--participant: column 'cue' is already used as another role"_s));
    }

    // ann: a (10, 14) and b (20); bo: a (7) and b (9, 11, 16). Pooled a: 10, 14, 7: n 3, mean
    // 31/3, squared deviations 8 + 12.5 (merge: 2*1/3 * (12 - 7)^2 = 50/3) = 8 + 50/3 = 74/3.
    void rowsBecomeParticipantCells()
    {
        const std::vector<SummaryRow> rows = {{u"a"_s, 2, 12, 8.0, false, u"row 1"_s, u"ann"_s},
                                              {u"b"_s, 1, 20, 0.0, false, u"row 2"_s, u"ann"_s},
                                              {u"a"_s, 1, 7, 0.0, false, u"row 3"_s, u"bo"_s},
                                              {u"b"_s, 3, 12, 26.0, false, u"row 4"_s, u"bo"_s}};
        const auto d = participantSummaryFromRows(rows, u"db, table 't'"_s, u"who"_s);
        QVERIFY2(d.ok(), qPrintable(d.error()));
        QCOMPARE(d->participants, (QStringList{u"ann"_s, u"bo"_s}));
        QCOMPARE(d->levels.size(), size_t(2));
        QCOMPARE(d->participantIndex, 4);
        QCOMPARE(d->columns.value(4), u"who"_s);
        QCOMPARE(d->participantCells[1][1].mean, 12.0);
        QCOMPARE(d->participantCells[1][1].m2, 26.0);
        const RunningStats &a = d->levels[0].stats;
        QCOMPARE(a.n, 3.0);
        QVERIFY(std::abs(a.mean - 31.0 / 3.0) < 1e-12);
        QVERIFY(std::abs(a.m2 - 74.0 / 3.0) < 1e-12);
        // Case weights adding up to 1 or less keep their sum of squares (a variance could not).
        const std::vector<SummaryRow> weighted = {{u"a"_s, 1.0, 5, 0.5, false, u"row 1"_s, u"ann"_s},
                                                  {u"b"_s, 0.5, 6, 0.0, false, u"row 2"_s, u"ann"_s}};
        QCOMPARE(participantSummaryFromRows(weighted, u"db"_s, u"who"_s)->participantCells[0][0].m2, 0.5);
    }

    void badRowsAreNamed_data()
    {
        QTest::addColumn<QString>("participant");
        QTest::addColumn<double>("n");
        QTest::addColumn<double>("ss");
        QTest::addColumn<QString>("message");
        QTest::newRow("no participant") << QString() << 2.0 << 1.0
                                        << u"row 2: the participant (column 'who') is missing; every row needs the participant it belongs to"_s;
        QTest::newRow("cell given twice") << u"ann"_s << 2.0 << 1.0 << u"row 2: level 'a' appears twice"_s;
        QTest::newRow("n not positive") << u"bo"_s << 0.0 << 1.0 << u"row 2: n '0' is not positive"_s;
    }

    void badRowsAreNamed()
    {
        QFETCH(QString, participant);
        QFETCH(double, n);
        QFETCH(double, ss);
        QFETCH(QString, message);
        const std::vector<SummaryRow> rows = {{u"a"_s, 2, 12, 8.0, false, u"row 1"_s, u"ann"_s},
                                              {u"a"_s, n, 3, ss, false, u"row 2"_s, participant}};
        const auto d = participantSummaryFromRows(rows, u"db"_s, u"who"_s);
        QVERIFY(!d.ok());
        QVERIFY2(d.error().startsWith(message), qPrintable(d.error()));
        QVERIFY(!participantSummaryFromRows({}, u"db, table 't'"_s, u"who"_s).ok());
    }
};

QTEST_GUILESS_MAIN(TestSummaryQuery)
#include "TestSummaryQuery.moc"
