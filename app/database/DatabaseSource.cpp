#include "app/database/DatabaseSource.h"

#include "core/base/Weight.h"

#include <QAtomicInteger>
#include <QFileInfo>
#include <QMetaType>
#include <QSqlDatabase>
#include <QSqlError>
#include <QSqlField>
#include <QSqlQuery>
#include <QSqlRecord>
#include <QUrl>

using namespace Qt::StringLiterals;

namespace cb {

namespace {

QString driverPackage(const QString &driver)
{
    if (driver == u"QSQLITE"_s)
        return u"libqt6sql6-sqlite"_s;
    if (driver == u"QPSQL"_s)
        return u"libqt6sql6-psql"_s;
    return u"libqt6sql6-odbc"_s;
}

QString engineText(const QSqlError &e)
{
    QString text = e.databaseText().trimmed();
    if (text.isEmpty())
        text = e.driverText().trimmed();
    return text.isEmpty() ? u"no reason given"_s : text;
}

bool isTextType(const QMetaType &type)
{
    const int id = type.id();
    return id == QMetaType::QString || id == QMetaType::QByteArray || id == QMetaType::QChar
        || id == QMetaType::QDate || id == QMetaType::QDateTime || id == QMetaType::QTime;
}

// The statement without the comment lines that head it: some ODBC drivers (SQLite's among them)
// take a comment for a second statement and refuse the query. Only the leading lines go, up to
// the first line that is not a comment, so nothing inside the statement (a quoted name) is touched.
QString withoutLeadingComments(const QString &sql)
{
    qsizetype start = 0;
    while (sql.mid(start, 2) == u"--"_s) {
        const qsizetype end = sql.indexOf(u'\n', start);
        if (end < 0)
            return {};
        start = end + 1;
    }
    return sql.mid(start);
}

// One connection, removed when it goes out of scope (after every QSqlDatabase copy is gone).
class Connection
{
public:
    explicit Connection(const DatabaseLocation &l)
    {
        static QAtomicInteger<int> counter;
        m_name = u"cb-summary-%1"_s.arg(counter.fetchAndAddRelaxed(1));
        QSqlDatabase db = QSqlDatabase::addDatabase(l.driver, m_name);
        db.setDatabaseName(l.database);
        if (!l.host.isEmpty())
            db.setHostName(l.host);
        if (l.port > 0)
            db.setPort(l.port);
        if (!l.user.isEmpty())
            db.setUserName(l.user);
        db.setConnectOptions(l.connectOptions);
    }
    ~Connection()
    {
        {
            QSqlDatabase db = QSqlDatabase::database(m_name, false);
            db.close();
        }
        QSqlDatabase::removeDatabase(m_name);
    }
    Connection(const Connection &) = delete;
    Connection &operator=(const Connection &) = delete;
    QSqlDatabase db() const { return QSqlDatabase::database(m_name, false); }

private:
    QString m_name;
};

Result<std::vector<SummaryRow>> runSummary(const DatabaseLocation &l, const SummaryQuerySpec &spec,
                                           const SummaryQuery &query)
{
    using R = Result<std::vector<SummaryRow>>;
    const QString place = databaseSourceName(l, spec.table);
    if (!QSqlDatabase::isDriverAvailable(l.driver))
        return R::failure(u"%1: the Qt SQL driver %2 is not installed (Debian package %3)"_s.arg(
            l.label, l.driver, driverPackage(l.driver)));
    Connection connection(l);
    QSqlDatabase db = connection.db();
    if (!db.open())
        return R::failure(u"%1: cannot connect: %2"_s.arg(l.label, engineText(db.lastError())));

    // The table's columns, from a SELECT that returns no rows: a missing table or column is
    // named here rather than in the engine's words about the whole query.
    QStringList columns;
    QSqlRecord record;
    {
        QSqlQuery probe(db);
        probe.setForwardOnly(true);
        if (!probe.exec(u"SELECT * FROM %1 WHERE 1 = 0"_s.arg(quoteSqlIdentifier(spec.table))))
            return R::failure(u"%1: cannot read table %2: %3; check the name (it is matched exactly, case included)"_s.arg(
                                  l.label, quoted(spec.table), engineText(probe.lastError())),
                              u"table"_s);
        record = probe.record();
        for (int i = 0; i < record.count(); ++i)
            columns << record.fieldName(i);
    }
    struct Role
    {
        QString option;
        QString name;
        bool numeric;
    };
    std::vector<Role> roles;
    for (const QString &f : spec.factorColumns)
        roles.push_back({u"factor"_s, f, false});
    roles.push_back({u"response"_s, spec.responseColumn, true});
    if (!spec.weightColumn.isEmpty())
        roles.push_back({u"weight"_s, spec.weightColumn, true});
    const bool twoLevel = !spec.participantColumn.isEmpty();
    if (twoLevel)
        roles.push_back({u"participant"_s, spec.participantColumn, false});
    for (const Role &r : roles) {
        qsizetype i = columns.indexOf(r.name);
        if (i < 0 && l.driver == u"QSQLITE"_s) // Qt's SQLite driver drops the double quotes from column names
            i = columns.indexOf(QString(r.name).remove(u'"'));
        if (i < 0)
            return R::failure(u"%1: --%2: no column %3; the columns are %4"_s.arg(
                                  place, r.option, quoted(r.name),
                                  columns.isEmpty() ? u"(none)"_s : columns.join(u", "_s)),
                              r.option);
        if (r.numeric && l.driver != u"QSQLITE"_s && isTextType(record.field(int(i)).metaType()))
            return R::failure(u"%1: --%2: column %3 holds text, not numbers; expected a numeric column"_s.arg(
                                  place, r.option, quoted(r.name)),
                              r.option);
    }
    // SQLite keeps a value's own type whatever the column says: count the values that are not numbers.
    if (l.driver == u"QSQLITE"_s) {
        for (const Role &r : roles) {
            if (!r.numeric)
                continue;
            QSqlQuery check(db);
            check.setForwardOnly(true);
            const QString c = quoteSqlIdentifier(r.name);
            if (!check.exec(u"SELECT COUNT(*), MAX(%1) FROM %2 WHERE typeof(%1) NOT IN ('integer', 'real', 'null')"_s.arg(
                    c, quoteSqlIdentifier(spec.table)))
                || !check.next())
                return R::failure(u"%1: cannot check column %2: %3"_s.arg(place, quoted(r.name), engineText(check.lastError())));
            if (const qint64 bad = check.value(0).toLongLong(); bad > 0)
                return R::failure(u"%1: --%2: column %3 holds %4 values as text, not numbers (such as %5); expected numbers (give the column "
                                    "a numeric type, REAL or INTEGER, and load the values again)"_s.arg(
                                      place, r.option, quoted(r.name), QString::number(bad),
                                      quoted(check.value(1).toString())),
                                  r.option);
        }
    }

    // The two-level form leaves rows without a participant out; as with a data file, such a row
    // is an error here rather than a silent loss.
    if (twoLevel) {
        QSqlQuery check(db);
        check.setForwardOnly(true);
        if (!check.exec(u"SELECT COUNT(*) FROM %1 WHERE %2 IS NULL AND %3 IS NOT NULL"_s.arg(
                quoteSqlIdentifier(spec.table), quoteSqlIdentifier(spec.participantColumn),
                quoteSqlIdentifier(spec.responseColumn)))
            || !check.next())
            return R::failure(u"%1: cannot check column %2: %3"_s.arg(place, quoted(spec.participantColumn),
                                                                     engineText(check.lastError())));
        if (const qint64 missing = check.value(0).toLongLong(); missing > 0)
            return R::failure(u"%1: --participant: %2 rows with a response have no participant (column %3 is NULL); every "
                              "row needs the participant it belongs to"_s.arg(place, QString::number(missing),
                                                                               quoted(spec.participantColumn)),
                              u"participant"_s);
    }

    QSqlQuery q(db);
    q.setForwardOnly(true);
    if (!q.exec(withoutLeadingComments(query.sql)))
        return R::failure(u"%1: the summary query failed: %2"_s.arg(place, engineText(q.lastError())));
    std::vector<SummaryRow> rows;
    const auto number = [&](int column, const QString &what, qint64 row, std::optional<double> &out) -> QString {
        const QVariant v = q.value(column);
        if (v.isNull())
            return {};
        bool ok = false;
        const double d = v.toDouble(&ok);
        if (!ok)
            return u"%1 row %2: %3 %4 is not a number"_s.arg(place, QString::number(row), what, quoted(v.toString()));
        out = d;
        return {};
    };
    while (q.next()) {
        const qint64 index = qint64(rows.size()) + 1;
        SummaryRow row;
        row.level = q.value(0).toString();
        row.place = u"%1 row %2 (level %3)"_s.arg(place, QString::number(index), quoted(row.level));
        if (twoLevel) {
            row.participant = q.value(4).toString();
            row.place = u"%1 row %2 (participant %3, level %4)"_s.arg(place, QString::number(index), quoted(row.participant),
                                                                      quoted(row.level));
        }
        row.spreadIsVariance = true;
        std::optional<double> n, mean;
        for (const QString &e : {number(1, u"n"_s, index, n), number(2, u"mean"_s, index, mean),
                                 number(3, u"variance"_s, index, row.spread)})
            if (!e.isEmpty())
                return R::failure(e);
        if (!n || !mean)
            return R::failure(u"%1: %2 is missing"_s.arg(row.place, n ? u"the mean"_s : u"n"_s));
        row.n = *n;
        row.mean = *mean;
        rows.push_back(std::move(row));
    }
    if (q.lastError().isValid())
        return R::failure(u"%1: reading the summary failed: %2"_s.arg(place, engineText(q.lastError())));
    if (rows.empty())
        return R::failure(u"%1: the summary query returned no rows: the table is empty or no row has both a level "
                          "and a response%2"_s.arg(place, spec.weightColumn.isEmpty() ? QString() : u" and a weight above 0"_s));
    return rows;
}

} // namespace

Result<DatabaseLocation> parseDatabaseUrl(const QString &text)
{
    using R = Result<DatabaseLocation>;
    const QString expected = u"expected sqlite:///path/to/file.db, postgresql://user@host:5432/dbname or odbc:DSN"_s;
    DatabaseLocation l;
    const QString url = text.trimmed();
    if (url.startsWith(u"sqlite://"_s, Qt::CaseInsensitive)) {
        l.driver = u"QSQLITE"_s;
        l.database = url.mid(9);
        l.label = url;
        if (l.database.isEmpty())
            return R::failure(u"--database: %1 names no file; %2"_s.arg(quoted(url), expected), u"database"_s);
        const QFileInfo info(l.database);
        if (!info.exists())
            return R::failure(u"--database: %1: no such file"_s.arg(quoted(l.database)), u"database"_s);
        if (!info.isFile())
            return R::failure(u"--database: %1 is not a file"_s.arg(quoted(l.database)), u"database"_s);
        l.connectOptions = u"QSQLITE_OPEN_READONLY"_s;
        return l;
    }
    if (url.startsWith(u"postgresql://"_s, Qt::CaseInsensitive) || url.startsWith(u"postgres://"_s, Qt::CaseInsensitive)) {
        const QUrl u(url, QUrl::StrictMode);
        if (!u.isValid())
            return R::failure(u"--database: %1 is not a valid URL: %2; %3"_s.arg(quoted(url), u.errorString(), expected),
                              u"database"_s);
        if (!u.password().isEmpty())
            return R::failure(u"--database: the URL holds a password; a password is never taken from the command "
                              "line: put it in PGPASSWORD or ~/.pgpass"_s,
                              u"database"_s);
        if (u.hasQuery() || u.hasFragment())
            return R::failure(u"--database: %1: options after '?' or '#' are not read; %2"_s.arg(quoted(url), expected),
                              u"database"_s);
        l.driver = u"QPSQL"_s;
        l.host = u.host();
        l.port = u.port(-1);
        l.user = u.userName();
        l.database = u.path().mid(1);
        if (l.database.isEmpty() || l.database.contains(u'/'))
            return R::failure(u"--database: %1 names no database; %2"_s.arg(quoted(url), expected), u"database"_s);
        QUrl shown = u;
        l.label = shown.toString();
        // A session that cannot write, and a bounded wait for the server.
        l.connectOptions = u"connect_timeout=15;options='-c default_transaction_read_only=on'"_s;
        return l;
    }
    if (url.startsWith(u"odbc:"_s, Qt::CaseInsensitive)) {
        l.driver = u"QODBC"_s;
        l.database = url.mid(5);
        l.label = url.left(5) + (l.database.contains(u'=') ? u"(connection string)"_s : l.database);
        if (l.database.isEmpty())
            return R::failure(u"--database: %1 names no data source; %2"_s.arg(quoted(url), expected), u"database"_s);
        if (l.database.contains(u"PWD="_s, Qt::CaseInsensitive) || l.database.contains(u"PASSWORD="_s, Qt::CaseInsensitive))
            return R::failure(u"--database: the connection string holds a password; a password is never taken from "
                              "the command line: keep it in the DSN (odbc.ini) or the driver's own store"_s,
                              u"database"_s);
        l.connectOptions = u"SQL_ATTR_ACCESS_MODE=SQL_MODE_READ_ONLY;SQL_ATTR_LOGIN_TIMEOUT=15"_s;
        return l;
    }
    return R::failure(u"--database: %1; %2"_s.arg(quoted(url), expected), u"database"_s);
}

SummaryRowSource databaseRowSource(const DatabaseLocation &location)
{
    return [location](const SummaryQuerySpec &spec, const SummaryQuery &query) { return runSummary(location, spec, query); };
}

QString databaseSourceName(const DatabaseLocation &location, const QString &table)
{
    return u"%1, table %2"_s.arg(location.label, quoted(table));
}

Result<DataSummary> readDatabaseSummary(const QString &url, const SummaryQuerySpec &spec)
{
    auto location = parseDatabaseUrl(url);
    if (!location)
        return Result<DataSummary>::failure(location.error(), location.field());
    return summaryFromSource(spec, databaseRowSource(*location), databaseSourceName(*location, spec.table));
}

} // namespace cb
