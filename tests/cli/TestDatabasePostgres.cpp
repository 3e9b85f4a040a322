// fit --database on PostgreSQL: the test starts a throwaway cluster (initdb and pg_ctl from
// /usr/lib/postgresql/<version>/bin, as the unprivileged user `nobody` when run as root, else as
// itself) on a free port in a temporary folder, and stops it at the end, also after a failure.
// The engine's summary of 10^6 rows, fitted, equals fit --data on the same rows copied out as CSV
// to 1e-9 (both variance forms), and so does the two-level form by participant against fit --data
// --participant; the password comes from PGPASSWORD or a password file only;
// hostile names stay inert; failures name the place. Missing server programs fail the test.
#include "app/database/DatabaseSource.h"
#include "tests/support/DatabaseTestSupport.h"
#include "tests/support/FitTestSupport.h"
#include "tests/support/ProcessRunner.h"

#include <QDir>
#include <QElapsedTimer>
#include <QFile>
#include <QProcess>
#include <QTemporaryDir>
#include <QTest>

#include <arpa/inet.h>
#include <netinet/in.h>
#include <sys/socket.h>
#include <unistd.h>

using namespace Qt::StringLiterals;
using namespace cb::test;

namespace {

const QString kUser = u"cbtest"_s;
const QString kPassword = u"bench-secret-7"_s;

// A port no one listens on now: the kernel's choice for a socket bound to port 0.
int freePort()
{
    const int s = ::socket(AF_INET, SOCK_STREAM, 0);
    if (s < 0)
        return -1;
    sockaddr_in a{};
    a.sin_family = AF_INET;
    a.sin_addr.s_addr = htonl(INADDR_LOOPBACK);
    a.sin_port = 0;
    socklen_t len = sizeof a;
    int port = -1;
    if (::bind(s, reinterpret_cast<sockaddr *>(&a), sizeof a) == 0 && ::getsockname(s, reinterpret_cast<sockaddr *>(&a), &len) == 0)
        port = ntohs(a.sin_port);
    ::close(s);
    return port;
}

QString serverBin()
{
    const QDir root(u"/usr/lib/postgresql"_s);
    QStringList versions = root.entryList(QDir::Dirs | QDir::NoDotAndDotDot);
    std::sort(versions.begin(), versions.end(), [](const QString &a, const QString &b) { return a.toInt() > b.toInt(); });
    for (const QString &v : versions)
        if (QFile::exists(root.filePath(v + u"/bin/initdb"_s)) && QFile::exists(root.filePath(v + u"/bin/pg_ctl"_s)))
            return root.filePath(v + u"/bin"_s);
    return {};
}

} // namespace

class TestDatabasePostgres : public QObject
{
    Q_OBJECT

    QTemporaryDir m_dir;
    QString m_work; // owned by the server's user
    QString m_bin;
    int m_port = -1;
    bool m_started = false;
    bool m_trialMade = false;

    bool asRoot() const { return ::geteuid() == 0; }

    // A server program, as `nobody` when the test runs as root (initdb refuses root).
    ProcessRun runServerProgram(const QString &program, const QStringList &args)
    {
        const QString path = m_bin + u'/' + program;
        if (asRoot())
            return runProcess(u"runuser"_s, QStringList{u"-u"_s, u"nobody"_s, u"--"_s, path} + args, {}, 120000);
        return runProcess(path, args, {}, 120000);
    }

    bool giveToServerUser(const QString &path)
    {
        if (!asRoot())
            return true;
        return runProcess(u"chown"_s, {u"-R"_s, u"nobody:nogroup"_s, path}).exitCode == 0;
    }

    void stopServer()
    {
        if (!m_started)
            return;
        runServerProgram(u"pg_ctl"_s, {u"-D"_s, m_work + u"/cluster"_s, u"-m"_s, u"fast"_s, u"-w"_s, u"stop"_s});
        m_started = false;
    }

    // The test's own connection (it may write: it makes the tables).
    QSqlDatabase connection()
    {
        const QString name = u"pg-test"_s;
        if (QSqlDatabase::contains(name))
            return QSqlDatabase::database(name);
        QSqlDatabase db = QSqlDatabase::addDatabase(u"QPSQL"_s, name);
        db.setHostName(u"127.0.0.1"_s);
        db.setPort(m_port);
        db.setUserName(kUser);
        db.setPassword(kPassword);
        db.setDatabaseName(u"postgres"_s);
        db.open();
        return db;
    }

    QString url() const { return u"postgresql://%1@127.0.0.1:%2/postgres"_s.arg(kUser).arg(m_port); }

    // The command line with the password in the environment only.
    ProcessRun runCliWith(const QStringList &args, const QProcessEnvironment &env)
    {
        return runProcess(cliProgram(), args, {}, 600000, {}, env);
    }
    ProcessRun runCliWithPassword(const QStringList &args)
    {
        QProcessEnvironment env = QProcessEnvironment::systemEnvironment();
        env.insert(u"PGPASSWORD"_s, kPassword);
        return runCliWith(args, env);
    }

    bool exec(const QString &sql)
    {
        QSqlDatabase db = connection();
        QSqlQuery q(db);
        if (!q.exec(sql)) {
            qWarning("%s: %s", qPrintable(sql), qPrintable(q.lastError().text()));
            return false;
        }
        return true;
    }

public:
    ~TestDatabasePostgres() override { stopServer(); }

private slots:
    void initTestCase()
    {
        m_bin = serverBin();
        QVERIFY2(!m_bin.isEmpty(), "PostgreSQL's server programs (initdb, pg_ctl) were not found in "
                                   "/usr/lib/postgresql/<version>/bin: install the Debian package postgresql "
                                   "(bash tools/dev.sh deps); this test starts its own throwaway cluster");
        QVERIFY2(QSqlDatabase::isDriverAvailable(u"QPSQL"_s), "Qt's PostgreSQL driver is missing: install libqt6sql6-psql");
        QVERIFY(m_dir.isValid());
        if (asRoot())
            QVERIFY(QFile::setPermissions(m_dir.path(), QFile::ReadOwner | QFile::WriteOwner | QFile::ExeOwner | QFile::ExeGroup
                                                            | QFile::ExeOther));
        m_work = m_dir.filePath(u"pg"_s);
        QVERIFY(QDir().mkpath(m_work));
        QVERIFY(writeFile(m_work + u"/password"_s, kPassword.toUtf8() + '\n'));
        QVERIFY(giveToServerUser(m_work));
        const ProcessRun init = runServerProgram(u"initdb"_s, {u"-D"_s, m_work + u"/cluster"_s, u"-U"_s, kUser, u"-A"_s,
                                                             u"scram-sha-256"_s, u"--pwfile"_s, m_work + u"/password"_s,
                                                             u"-E"_s, u"UTF8"_s, u"--locale"_s, u"C"_s, u"--no-sync"_s});
        QVERIFY2(init.exitCode == 0, qPrintable(u"initdb failed: "_s + init.errText() + init.outText()));
        m_port = freePort();
        QVERIFY(m_port > 0);
        const ProcessRun start = runServerProgram(
            u"pg_ctl"_s, {u"-D"_s, m_work + u"/cluster"_s, u"-l"_s, m_work + u"/server.log"_s, u"-w"_s, u"-t"_s, u"60"_s, u"-o"_s,
                          u"-p %1 -k %2 -c listen_addresses=127.0.0.1 -c fsync=off -c full_page_writes=off"_s.arg(m_port).arg(m_work),
                          u"start"_s});
        m_started = start.exitCode == 0;
        QVERIFY2(m_started, qPrintable(u"pg_ctl start failed: "_s + start.errText() + start.outText()));
        QSqlDatabase db = connection();
        QVERIFY2(db.isOpen(), qPrintable(db.lastError().text()));
    }

    void cleanupTestCase()
    {
        {
            QSqlDatabase db = QSqlDatabase::database(u"pg-test"_s, false);
            db.close();
        }
        QSqlDatabase::removeDatabase(u"pg-test"_s);
        stopServer();
    }

    // 10^6 rows made by the engine (generate_series), copied out as CSV by the engine (COPY),
    // fitted both ways. The times go to the log (speed targets live in bench/, not here).
    void millionRowsEqualFitFromCsv_data()
    {
        QTest::addColumn<QStringList>("extra");
        QTest::newRow("centred first pass") << QStringList{};
        QTest::newRow("engine VAR_SAMP") << QStringList{u"--variance"_s, u"engine"_s};
        QTest::newRow("weighted") << QStringList{u"--weight"_s, u"effort"_s};
    }

    void millionRowsEqualFitFromCsv()
    {
        QFETCH(QStringList, extra);
        const QString csv = m_work + u"/survey.csv"_s;
        if (!QFile::exists(csv)) {
            // An invented bird survey: counts per hour at five habitats, an effort weight.
            QVERIFY(exec(u"CREATE TABLE survey AS SELECT (ARRAY['meadow','orchard','hedge','pond','verge'])[1 + g % 5] AS habitat, "
                         "CAST(40 + (g % 5) * 1.5 + ((g * 2654435761) % 1000003) / 100000.0 AS DOUBLE PRECISION) AS per_hour, "
                         "CAST(1 + g % 4 AS DOUBLE PRECISION) / 2 AS effort "
                         "FROM generate_series(CAST(1 AS BIGINT), 1000000) AS g"_s));
            QVERIFY(exec(u"COPY survey TO '%1' (FORMAT csv, HEADER)"_s.arg(csv)));
        }
        QStringList common = {u"--factor"_s, u"habitat"_s, u"--response"_s, u"per_hour"_s, u"--levels"_s,
                              u"meadow,orchard,hedge,pond,verge"_s, u"--scheme"_s, u"helmert"_s, u"--json"_s};
        QStringList csvExtra;
        if (extra.contains(u"--weight"_s))
            csvExtra << u"--weight"_s << u"effort"_s;
        QElapsedTimer t;
        t.start();
        const ProcessRun fromDb = runCliWithPassword(QStringList{u"fit"_s, u"--database"_s, url(), u"--table"_s, u"survey"_s}
                                                     + common + extra);
        const qint64 dbMs = t.restart();
        QVERIFY2(fromDb.exitCode == 0, qPrintable(fromDb.errText()));
        const ProcessRun fromCsv = runCli(QStringList{u"fit"_s, u"--data"_s, csv} + common + csvExtra);
        const qint64 csvMs = t.elapsed();
        QVERIFY2(fromCsv.exitCode == 0, qPrintable(fromCsv.errText()));
        qInfo("10^6 rows: fit --database %lld ms, fit --data (CSV) %lld ms", dbMs, csvMs);
        const QJsonObject a = jsonOf(fromDb.out), b = jsonOf(fromCsv.out);
        QCOMPARE(a[u"n"_s].toDouble(), extra.contains(u"--weight"_s) ? 1250000.0 : 1e6);
        const QString difference = compareFits(a, b, 1e-9);
        QVERIFY2(difference.isEmpty(), qPrintable(difference));
    }

    // The two-level form on 10^6 rows made by the engine: 2,000 participants with 125 trials at each
    // of four cue types (every 7th participant has none at the last), fitted by participant, equals
    // fit --data --participant on the same rows copied out as CSV to 1e-9.
    void byParticipantEqualsFitFromCsv_data()
    {
        QTest::addColumn<QStringList>("extra");
        QTest::newRow("centred first pass") << QStringList{};
        QTest::newRow("engine VAR_SAMP") << QStringList{u"--variance"_s, u"engine"_s};
        QTest::newRow("weighted") << QStringList{u"--weight"_s, u"w"_s};
    }

    void byParticipantEqualsFitFromCsv()
    {
        QFETCH(QStringList, extra);
        const QString csv = m_work + u"/trials.csv"_s;
        if (!QFile::exists(csv)) {
            // An invented cueing study: reaction times in ms; participants "p00001" ... in text order.
            QVERIFY(exec(u"CREATE TABLE trials AS SELECT 'p' || lpad(CAST(1 + g / 500 AS TEXT), 5, '0') AS who, "
                         "(ARRAY['plain','arrow','word','tone'])[1 + g % 4] AS cue, "
                         "CAST(480 + (g % 4) * 6 + ((g / 500) % 13) * 2.5 + ((g * 2654435761) % 1000003) / 20000.0 AS DOUBLE PRECISION) AS rt, "
                         "CAST(1 + g % 3 AS DOUBLE PRECISION) / 2 AS w "
                         "FROM generate_series(CAST(0 AS BIGINT), 999999) AS g WHERE NOT ((g / 500) % 7 = 6 AND g % 4 = 3)"_s));
            QVERIFY(exec(u"COPY (SELECT * FROM trials ORDER BY who) TO '%1' (FORMAT csv, HEADER)"_s.arg(csv)));
        }
        QStringList common = {u"--factor"_s, u"cue"_s, u"--response"_s, u"rt"_s, u"--participant"_s, u"who"_s, u"--levels"_s,
                              u"plain,arrow,word,tone"_s, u"--scheme"_s, u"helmert"_s, u"--adjust"_s, u"holm"_s, u"--json"_s};
        QStringList csvExtra;
        if (extra.contains(u"--weight"_s))
            csvExtra << u"--weight"_s << u"w"_s;
        QElapsedTimer t;
        t.start();
        const ProcessRun fromDb = runCliWithPassword(QStringList{u"fit"_s, u"--database"_s, url(), u"--table"_s, u"trials"_s}
                                                     + common + extra);
        const qint64 dbMs = t.restart();
        QVERIFY2(fromDb.exitCode == 0, qPrintable(fromDb.errText()));
        const ProcessRun fromCsv = runCli(QStringList{u"fit"_s, u"--data"_s, csv} + common + csvExtra);
        const qint64 csvMs = t.elapsed();
        QVERIFY2(fromCsv.exitCode == 0, qPrintable(fromCsv.errText()));
        qInfo("by participant, %lld rows: fit --database %lld ms, fit --data (CSV) %lld ms",
              qint64(jsonOf(fromCsv.out)[u"data"_s][u"used_rows"_s].toDouble()), dbMs, csvMs);
        const QJsonObject a = jsonOf(fromDb.out), b = jsonOf(fromCsv.out);
        QCOMPARE(a[u"participants"_s][u"count"_s].toInt(), 2000);
        QCOMPARE(a[u"participants"_s][u"complete"_s].toInt(), 2000 - 285); // 285 of p = 0..1999 have p % 7 = 6
        QCOMPARE(a[u"omnibus"_s][u"test"_s].toString(), u"hotelling"_s);
        const QString difference = compareFits(a, b, 1e-9);
        QVERIFY2(difference.isEmpty(), qPrintable(difference));
    }

    // The two-level form with hostile table, factor, response and participant names.
    void hostileNamesStayInertByParticipant()
    {
        const QString table = u"t\"; DROP TABLE keep_within; --"_s;
        const QStringList columns = {u"who\" FROM keep_within; DELETE FROM keep_within; --"_s,
                                     u"cue'); DROP TABLE keep_within; --"_s, u"rt\"\" --"_s, u"w"_s};
        const auto rows = generateWithinRows(15, {u"p"_s, u"q"_s, u"r"_s}, 3, 5.0, 1.0, 9);
        QSqlDatabase db = connection();
        QCOMPARE(fillTable(db, table, columns, rows), QString());
        QVERIFY(exec(u"CREATE TABLE keep_within (a INTEGER)"_s) && exec(u"INSERT INTO keep_within VALUES (1), (2), (3)"_s));
        const ProcessRun run = runCliWithPassword({u"fit"_s, u"--database"_s, url(), u"--table"_s, table, u"--factor"_s, columns[1],
                                                   u"--response"_s, columns[2], u"--participant"_s, columns[0], u"--levels"_s,
                                                   u"p,q,r"_s, u"--scheme"_s, u"sum"_s, u"--json"_s});
        QVERIFY2(run.exitCode == 0, qPrintable(run.errText()));
        QCOMPARE(jsonOf(run.out)[u"participants"_s][u"count"_s].toInt(), 15);
        QSqlQuery q(db);
        QVERIFY(q.exec(u"SELECT COUNT(*) FROM keep_within"_s) && q.next());
        QCOMPARE(q.value(0).toInt(), 3);
    }

    void passwordFromFileOrEnvironmentOnly()
    {
        const QStringList args = {u"fit"_s, u"--database"_s, url(), u"--table"_s, u"survey"_s, u"--factor"_s, u"habitat"_s,
                                  u"--response"_s, u"per_hour"_s, u"--levels"_s, u"meadow,orchard,hedge,pond,verge"_s,
                                  u"--scheme"_s, u"sum"_s, u"--json"_s};
        QProcessEnvironment env = QProcessEnvironment::systemEnvironment();
        env.remove(u"PGPASSWORD"_s);
        env.insert(u"PGPASSFILE"_s, m_dir.filePath(u"none"_s));
        const ProcessRun without = runCliWith(args, env);
        QCOMPARE(without.exitCode, 2);
        QVERIFY2(without.errText().startsWith(u"contrast-bench-cli fit: %1: cannot connect: "_s.arg(url())), qPrintable(without.errText()));
        // The usual password file (here named by PGPASSFILE, as ~/.pgpass would be found).
        const QString pgpass = m_dir.filePath(u"pgpass"_s);
        QVERIFY(writeFile(pgpass, u"127.0.0.1:%1:postgres:%2:%3\n"_s.arg(m_port).arg(kUser, kPassword).toUtf8()));
        QVERIFY(QFile::setPermissions(pgpass, QFile::ReadOwner | QFile::WriteOwner));
        env.insert(u"PGPASSFILE"_s, pgpass);
        const ProcessRun withFile = runCliWith(args, env);
        QVERIFY2(withFile.exitCode == 0, qPrintable(withFile.errText()));
    }

    void hostileNamesStayInert()
    {
        const QString table = u"x\"; DROP TABLE keep; --"_s;
        const QStringList columns = {u"lvl\" FROM keep; DELETE FROM keep; --"_s, u"y'); DROP TABLE keep; --"_s, u"w"_s};
        const auto rows = generateRows({{u"p"_s, u"q"_s}}, 300, 5.0, 1.0, 5);
        QSqlDatabase db = connection();
        QCOMPARE(fillTable(db, table, columns, rows), QString());
        QVERIFY(exec(u"CREATE TABLE keep (a INTEGER)"_s) && exec(u"INSERT INTO keep VALUES (1), (2), (3)"_s));
        const ProcessRun run = runCliWithPassword({u"fit"_s, u"--database"_s, url(), u"--table"_s, table, u"--factor"_s, columns[0],
                                                   u"--response"_s, columns[1], u"--levels"_s, u"p,q"_s, u"--scheme"_s, u"sum"_s,
                                                   u"--json"_s});
        QVERIFY2(run.exitCode == 0, qPrintable(run.errText()));
        QCOMPARE(jsonOf(run.out)[u"n"_s].toDouble(), 300.0);
        // The session itself cannot write: a statement that tries is refused by the server.
        qputenv("PGPASSWORD", kPassword.toUtf8());
        cb::SummaryQuerySpec spec;
        spec.table = u"keep"_s;
        spec.responseColumn = u"a"_s; // the probe checks it; the statement below is what runs
        const auto location = cb::parseDatabaseUrl(url());
        QVERIFY(location.ok());
        const auto refused = cb::databaseRowSource(*location)(spec, cb::SummaryQuery{u"INSERT INTO keep VALUES (4)"_s, {}});
        qunsetenv("PGPASSWORD");
        QVERIFY(!refused.ok());
        QVERIFY2(refused.error().contains(u"read-only transaction"_s), qPrintable(refused.error()));
        QSqlQuery q(db);
        QVERIFY(q.exec(u"SELECT COUNT(*) FROM keep"_s) && q.next());
        QCOMPARE(q.value(0).toInt(), 3);
    }

    void errorsNameThePlace_data()
    {
        QTest::addColumn<QStringList>("args");
        QTest::addColumn<QString>("message");
        const QStringList scheme = {u"--levels"_s, u"a,b"_s, u"--scheme"_s, u"treatment"_s};
        QTest::newRow("missing table") << QStringList{u"--table"_s, u"absent"_s, u"--factor"_s, u"arm"_s, u"--response"_s, u"score"_s} + scheme
                                       << u"cannot read table 'absent'"_s;
        QTest::newRow("missing column (case counts)") << QStringList{u"--table"_s, u"trial"_s, u"--factor"_s, u"arm"_s, u"--response"_s, u"Score"_s} + scheme
                                                      << u", table 'trial': --response: no column 'Score'; the columns are arm, score, note"_s;
        QTest::newRow("non-numeric response") << QStringList{u"--table"_s, u"trial"_s, u"--factor"_s, u"arm"_s, u"--response"_s, u"note"_s} + scheme
                                              << u", table 'trial': --response: column 'note' holds text, not numbers; expected a numeric column"_s;
        QTest::newRow("empty result") << QStringList{u"--table"_s, u"trial_empty"_s, u"--factor"_s, u"arm"_s, u"--response"_s, u"score"_s} + scheme
                                      << u", table 'trial_empty': the summary query returned no rows"_s;
    }

    void errorsNameThePlace()
    {
        QFETCH(QStringList, args);
        QFETCH(QString, message);
        if (!m_trialMade) {
            m_trialMade = true;
            QVERIFY(exec(u"CREATE TABLE trial (arm TEXT, score DOUBLE PRECISION, note TEXT)"_s));
            QVERIFY(exec(u"INSERT INTO trial VALUES ('a', 1, 'fine'), ('b', 2, 'good')"_s));
            QVERIFY(exec(u"CREATE TABLE trial_empty (arm TEXT, score DOUBLE PRECISION)"_s));
        }
        const ProcessRun run = runCliWithPassword(QStringList{u"fit"_s, u"--database"_s, url()} + args);
        QCOMPARE(run.exitCode, 2);
        QVERIFY2(run.errText().startsWith(u"contrast-bench-cli fit: "_s + url()) && run.errText().contains(message),
                 qPrintable(run.errText()));
    }

    void connectionFailureIsNamed()
    {
        const QString closed = u"postgresql://%1@127.0.0.1:%2/postgres"_s.arg(kUser).arg(freePort());
        const ProcessRun run = runCliWithPassword({u"fit"_s, u"--database"_s, closed, u"--table"_s, u"t"_s, u"--factor"_s, u"a"_s,
                                                   u"--response"_s, u"b"_s, u"--levels"_s, u"a,b"_s, u"--scheme"_s, u"sum"_s});
        QCOMPARE(run.exitCode, 2);
        QVERIFY2(run.errText().startsWith(u"contrast-bench-cli fit: %1: cannot connect: "_s.arg(closed)), qPrintable(run.errText()));
    }
};

QTEST_GUILESS_MAIN(TestDatabasePostgres)
#include "TestDatabasePostgres.moc"
