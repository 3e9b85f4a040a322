// fit --database odbc:DSN through Qt's QODBC, unixODBC and the SQLite ODBC driver (Debian packages
// libqt6sql6-odbc, unixodbc, libsqliteodbc). The driver and the data source are described in a
// temporary odbcinst.ini and odbc.ini that ODBCSYSINI and ODBCINI point at, so no system file is
// read or touched. The engine's summary, fitted, equals fit --data on the same rows as CSV to 1e-9
// (one factor, weighted, and the two-level form by participant); hostile names stay inert; the data
// source opens the file read-only (a URI with mode=ro: this driver ignores the connection's
// read-only access mode) and the file's bytes do not change; an unknown data source
// is named. A missing driver fails the test, naming the package.
#include "app/database/DatabaseSource.h"
#include "tests/support/DatabaseTestSupport.h"
#include "tests/support/FitTestSupport.h"
#include "tests/support/ProcessRunner.h"

#include <QDir>
#include <QFile>
#include <QFileInfo>
#include <QLibrary>
#include <QTemporaryDir>
#include <QTest>

using namespace Qt::StringLiterals;
using namespace cb::test;

namespace {

// The SQLite 3 ODBC driver's library, wherever the architecture puts it.
QString sqliteOdbcDriver()
{
    const QDir lib(u"/usr/lib"_s);
    for (const QString &triplet : lib.entryList(QDir::Dirs | QDir::NoDotAndDotDot))
        if (const QString path = lib.filePath(triplet + u"/odbc/libsqlite3odbc.so"_s); QFile::exists(path))
            return path;
    return {};
}

} // namespace

class TestDatabaseOdbc : public QObject
{
    Q_OBJECT

    QTemporaryDir m_dir;
    QLibrary m_odbcinst; // sanitizer build only: see initTestCase
    QStringList m_sources; // "[name]\nDriver=...\nDatabase=..." sections of odbc.ini

    // A SQLite file filled through the test's own writable connection, and a data source for it.
    QString makeSource(const QString &name, const std::function<void(QSqlDatabase &)> &fill)
    {
        const QString path = m_dir.filePath(name + u".db"_s);
        if (!makeSqliteFile(path, name, fill))
            return {};
        // Read-only in the data source itself: the SQLite ODBC driver ignores the read-only access
        // mode the connection asks for (hostileNamesStayInert showed an INSERT going through), and
        // opens the file read-only when given it as a URI with mode=ro, as the README says.
        m_sources << u"[%1]\nDriver=Contrast Bench SQLite3\nDatabase=file:%2?mode=ro\nNoCreat=1\n"_s.arg(name, path);
        if (!writeFile(m_dir.filePath(u"odbc.ini"_s), m_sources.join(u'\n').toUtf8()))
            return {};
        return path;
    }

private slots:
    void initTestCase()
    {
        QVERIFY(m_dir.isValid());
        QVERIFY2(QSqlDatabase::isDriverAvailable(u"QODBC"_s), "Qt's ODBC driver is missing: install libqt6sql6-odbc");
        const QString driver = sqliteOdbcDriver();
        QVERIFY2(!driver.isEmpty(), "the SQLite ODBC driver (/usr/lib/<triplet>/odbc/libsqlite3odbc.so) is missing: install "
                                    "libsqliteodbc (bash tools/dev.sh deps)");
        QVERIFY(writeFile(m_dir.filePath(u"odbcinst.ini"_s), u"[Contrast Bench SQLite3]\nDriver=%1\n"_s.arg(driver).toUtf8()));
        QVERIFY(writeFile(m_dir.filePath(u"odbc.ini"_s), {}));
        // unixODBC reads odbcinst.ini (and a system odbc.ini) from ODBCSYSINI and the user's data
        // sources from ODBCINI: here both are the test's own files, for it and the programs it runs.
        qputenv("ODBCSYSINI", QFile::encodeName(m_dir.path()));
        qputenv("ODBCINI", QFile::encodeName(m_dir.filePath(u"odbc.ini"_s)));
        // Under the sanitizer build (tools/dev.sh sanitize sets ASAN_OPTIONS): unixODBC's driver
        // manager loads libodbcinst at run time to read the ini files and unloads it after the
        // connection; the ini cache its globals still point to then looks leaked, in a module
        // LeakSanitizer can no longer name (so tests/lsan.supp cannot forgive it). Preloading the
        // library keeps it, and its roots, for the programs' lifetime: no report, and leak
        // checking stays on for everything else. (With it preloaded, the suite reports no leak.)
        if (qEnvironmentVariableIsSet("ASAN_OPTIONS")) {
            const QString odbcinst = QFileInfo(driver).dir().filePath(u"../libodbcinst.so.2"_s);
            QVERIFY2(QFile::exists(odbcinst), qPrintable(odbcinst + u": unixODBC's libodbcinst is missing"_s));
            qputenv("LD_PRELOAD", QFile::encodeName(QFileInfo(odbcinst).canonicalFilePath()));
            // ASan wants its runtime first among the libraries; a preloaded plain C library is harmless.
            qputenv("ASAN_OPTIONS", qgetenv("ASAN_OPTIONS") + ":verify_asan_link_order=0");
            // This test's own process (it reads through QODBC too) keeps the library the Qt way.
            m_odbcinst.setFileName(odbcinst);
            m_odbcinst.setLoadHints(QLibrary::PreventUnloadHint);
            QVERIFY2(m_odbcinst.load(), qPrintable(m_odbcinst.errorString()));
        }
    }

    void fitFromOdbcEqualsFitFromCsv_data()
    {
        QTest::addColumn<QStringList>("extra"); // with --participant, the rows are by participant
        QTest::newRow("one factor") << QStringList{u"--scheme"_s, u"helmert"_s};
        QTest::newRow("weighted") << QStringList{u"--scheme"_s, u"sum"_s, u"--weight"_s, u"w"_s};
        QTest::newRow("by participant") << QStringList{u"--scheme"_s, u"treatment"_s, u"--participant"_s, u"who"_s};
    }

    void fitFromOdbcEqualsFitFromCsv()
    {
        QFETCH(QStringList, extra);
        const bool within = extra.contains(u"--participant"_s);
        const QStringList levels = {u"north"_s, u"south"_s, u"east"_s};
        QStringList columns = {u"region"_s, u"minutes"_s, u"w"_s};
        std::vector<GeneratedRow> rows = generateRows({levels}, 4000, 250.0, 12.0, 31);
        if (within) {
            columns.prepend(u"who"_s);
            rows = generateWithinRows(40, levels, 5, 250.0, 12.0, 32);
        }
        const QString name = u"cb_"_s + QString::fromLatin1(QTest::currentDataTag()).replace(u' ', u'_');
        const QString db = makeSource(name, [&](QSqlDatabase &d) { QCOMPARE(fillTable(d, u"visits"_s, columns, rows), QString()); });
        QVERIFY(!db.isEmpty());
        const QString csv = m_dir.filePath(name + u".csv"_s);
        QVERIFY(writeFile(csv, rowsToCsv(columns, rows)));
        const QStringList common = QStringList{u"--factor"_s, u"region"_s, u"--response"_s, u"minutes"_s, u"--levels"_s,
                                               levels.join(u','), u"--json"_s} + extra;
        const QByteArray before = fileHash(db);
        const ProcessRun fromDb = runCli(QStringList{u"fit"_s, u"--database"_s, u"odbc:"_s + name, u"--table"_s, u"visits"_s} + common);
        QVERIFY2(fromDb.exitCode == 0, qPrintable(fromDb.errText()));
        const ProcessRun fromCsv = runCli(QStringList{u"fit"_s, u"--data"_s, csv} + common);
        QVERIFY2(fromCsv.exitCode == 0, qPrintable(fromCsv.errText()));
        const QJsonObject a = jsonOf(fromDb.out), b = jsonOf(fromCsv.out);
        QCOMPARE(a[u"data"_s][u"source"_s].toString(), u"odbc:%1, table 'visits'"_s.arg(name));
        if (within)
            QCOMPARE(a[u"participants"_s][u"count"_s].toInt(), 40);
        const QString difference = compareFits(a, b, 1e-9);
        QVERIFY2(difference.isEmpty(), qPrintable(difference));
        QCOMPARE(fileHash(db), before);
    }

    // Names made to break out of an identifier stay names through the ODBC driver too.
    void hostileNamesStayInert()
    {
        const QString &table = kHostileTable;
        const QStringList &columns = kHostileColumns;
        const QString path = makeSource(u"cb_hostile"_s, [&](QSqlDatabase &d) { QCOMPARE(fillHostileTables(d, 200), QString()); });
        QVERIFY(!path.isEmpty());
        const QByteArray before = fileHash(path);
        const ProcessRun run = runCli({u"fit"_s, u"--database"_s, u"odbc:cb_hostile"_s, u"--table"_s, table, u"--factor"_s,
                                       columns[0], u"--response"_s, columns[1], u"--levels"_s, u"p,q"_s, u"--scheme"_s, u"sum"_s,
                                       u"--json"_s});
        QVERIFY2(run.exitCode == 0, qPrintable(run.errText()));
        QCOMPARE(jsonOf(run.out)[u"n"_s].toDouble(), 200.0);
        QCOMPARE(fileHash(path), before);
        // The data source is read-only: a statement that tries to write is refused by the engine.
        cb::SummaryQuerySpec spec;
        spec.table = u"keep"_s;
        spec.responseColumn = u"a"_s; // the probe checks it; the statement below is what runs
        const auto location = cb::parseDatabaseUrl(u"odbc:cb_hostile"_s);
        QVERIFY(location.ok());
        const auto refused = cb::databaseRowSource(*location)(spec, cb::SummaryQuery{u"INSERT INTO keep VALUES (4)"_s, {}});
        QVERIFY(!refused.ok());
        QVERIFY2(refused.error().contains(u"readonly"_s), qPrintable(refused.error()));
        QCOMPARE(fileHash(path), before);
    }

    void unknownDataSourceIsNamed()
    {
        const ProcessRun run = runCli({u"fit"_s, u"--database"_s, u"odbc:cb_absent"_s, u"--table"_s, u"t"_s, u"--factor"_s, u"a"_s,
                                       u"--response"_s, u"y"_s, u"--levels"_s, u"p,q"_s, u"--scheme"_s, u"sum"_s});
        QCOMPARE(run.exitCode, 2);
        QVERIFY2(run.errText().startsWith(u"contrast-bench-cli fit: odbc:cb_absent: cannot connect: "_s), qPrintable(run.errText()));
    }
};

QTEST_GUILESS_MAIN(TestDatabaseOdbc)
#include "TestDatabaseOdbc.moc"
