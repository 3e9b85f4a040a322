#pragma once
// Helpers shared by the database tests (tests/cli/TestDatabaseFit.cpp on SQLite,
// tests/cli/TestDatabasePostgres.cpp on a throwaway PostgreSQL cluster): generated rows written to
// a table and to a CSV file, and the comparison of two fits' JSON.

#include <QCryptographicHash>
#include <QFile>
#include <QJsonArray>
#include <QJsonDocument>
#include <QJsonObject>
#include <QSqlDatabase>
#include <QSqlError>
#include <QSqlQuery>
#include <QString>
#include <QStringList>
#include <QVariant>

#include <algorithm>
#include <functional>
#include <cmath>
#include <random>
#include <vector>

namespace cb::test {

// One generated row: factor values, response, weight.
struct GeneratedRow
{
    QStringList factors;
    double y = 0.0;
    double w = 1.0;
};

// Rows over the levels of each factor (crossed), with level effects, normal noise and, when
// weighted, weights 0.5 to 3 in steps of 0.5. Seeded: the same rows every run.
inline std::vector<GeneratedRow> generateRows(const std::vector<QStringList> &factorLevels, int rows, double centre,
                                              double sd, unsigned seed)
{
    std::mt19937_64 rng(seed);
    std::normal_distribution<double> noise(0.0, sd);
    std::uniform_int_distribution<int> weight(1, 6);
    std::vector<GeneratedRow> out;
    out.reserve(size_t(rows));
    for (int i = 0; i < rows; ++i) {
        GeneratedRow r;
        double effect = 0.0;
        for (size_t f = 0; f < factorLevels.size(); ++f) {
            const int k = int(std::uniform_int_distribution<int>(0, int(factorLevels[f].size()) - 1)(rng));
            r.factors << factorLevels[f][k];
            effect += (k + 1) * (f + 1) * 0.37;
        }
        r.y = centre + effect + noise(rng);
        r.w = weight(rng) * 0.5;
        out.push_back(r);
    }
    return out;
}

// A file's SHA-256, to show that reading a database left its bytes alone; empty if unreadable.
inline QByteArray fileHash(const QString &path)
{
    QFile f(path);
    if (!f.open(QIODevice::ReadOnly))
        return {};
    return QCryptographicHash::hash(f.readAll(), QCryptographicHash::Sha256);
}

// A SQLite file at path, filled through a writable connection of the test's own (the programs
// open their own, read-only). Returns false when it cannot be opened.
inline bool makeSqliteFile(const QString &path, const QString &connectionName, const std::function<void(QSqlDatabase &)> &fill)
{
    bool opened = false;
    {
        QSqlDatabase db = QSqlDatabase::addDatabase(QStringLiteral("QSQLITE"), connectionName);
        db.setDatabaseName(path);
        opened = db.open();
        if (opened)
            fill(db);
        db.close();
    }
    QSqlDatabase::removeDatabase(connectionName);
    return opened;
}

// Rows of a factor measured within participants: factors = {participant, level}. Participants
// "p0001", "p0002", ... (text order is their order), each with its own offset (SD 3 sd), 1 to
// `replicates` trials per level in a shuffled order; every 7th participant lacks the last level.
// Written participant by participant, so a data file's first-appearance order is the text order.
inline std::vector<GeneratedRow> generateWithinRows(int participants, const QStringList &levels, int replicates,
                                                    double centre, double sd, unsigned seed)
{
    std::mt19937_64 rng(seed);
    std::normal_distribution<double> noise(0.0, sd);
    std::uniform_int_distribution<int> count(1, replicates);
    std::uniform_int_distribution<int> weight(1, 6);
    std::vector<GeneratedRow> out;
    for (int p = 1; p <= participants; ++p) {
        const QString who = QStringLiteral("p%1").arg(p, 4, 10, QLatin1Char('0'));
        const double offset = 3.0 * noise(rng);
        std::vector<GeneratedRow> mine;
        for (qsizetype k = 0; k < levels.size(); ++k) {
            if (p % 7 == 0 && k + 1 == levels.size())
                continue;
            for (int r = count(rng); r > 0; --r)
                mine.push_back({{who, levels[k]}, centre + offset + 0.6 * double(k) * sd + noise(rng), weight(rng) * 0.5});
        }
        std::shuffle(mine.begin(), mine.end(), rng);
        out.insert(out.end(), mine.begin(), mine.end());
    }
    return out;
}

// The CSV `fit --data` reads: the factor columns, the response and the weight, with a header.
// Numbers with 17 significant digits, so the file holds exactly the values in the table.
inline QByteArray rowsToCsv(const QStringList &header, const std::vector<GeneratedRow> &rows)
{
    QByteArray out = header.join(u',').toUtf8() + '\n';
    for (const GeneratedRow &r : rows) {
        QStringList cells = r.factors;
        cells << QString::number(r.y, 'g', 17) << QString::number(r.w, 'g', 17);
        out += cells.join(u',').toUtf8() + '\n';
    }
    return out;
}

// Creates the table (its name and columns quoted as the SQL standard says) and inserts the rows
// in one transaction with bound values. Returns an empty string or the engine's message.
inline QString fillTable(QSqlDatabase &db, const QString &table, const QStringList &columns,
                         const std::vector<GeneratedRow> &rows, const QString &numberType = QStringLiteral("DOUBLE PRECISION"))
{
    const auto quote = [](QString s) { return QLatin1Char('"') + s.replace(QLatin1Char('"'), QStringLiteral("\"\"")) + QLatin1Char('"'); };
    QStringList defs, marks;
    const qsizetype factors = columns.size() - 2;
    for (qsizetype i = 0; i < columns.size(); ++i) {
        defs << quote(columns[i]) + (i < factors ? QStringLiteral(" VARCHAR(100)") : QLatin1Char(' ') + numberType);
        marks << QStringLiteral("?");
    }
    QSqlQuery q(db);
    if (!q.exec(QStringLiteral("CREATE TABLE %1 (%2)").arg(quote(table), defs.join(QStringLiteral(", ")))))
        return q.lastError().text();
    if (!db.transaction())
        return db.lastError().text();
    if (!q.prepare(QStringLiteral("INSERT INTO %1 VALUES (%2)").arg(quote(table), marks.join(QStringLiteral(", ")))))
        return q.lastError().text();
    for (const GeneratedRow &r : rows) {
        for (qsizetype i = 0; i < r.factors.size(); ++i)
            q.bindValue(int(i), r.factors[i]);
        q.bindValue(int(factors), r.y);
        q.bindValue(int(factors + 1), r.w);
        if (!q.exec())
            return q.lastError().text();
    }
    return db.commit() ? QString() : db.lastError().text();
}

// A table and columns named to break out of an identifier, filled with rows over the levels p and
// q, beside a table "keep" of three rows that the names try to drop or empty. Returns an empty
// string or the engine's message.
inline const QString kHostileTable = QStringLiteral("x\"; DROP TABLE keep; --");
inline const QStringList kHostileColumns = {QStringLiteral("lvl\" FROM keep; DELETE FROM keep; --"),
                                            QStringLiteral("y'); DROP TABLE keep; --"), QStringLiteral("w")};
inline QString fillHostileTables(QSqlDatabase &db, int rows)
{
    if (QString e = fillTable(db, kHostileTable, kHostileColumns, generateRows({{QStringLiteral("p"), QStringLiteral("q")}}, rows, 5.0, 1.0, 3));
        !e.isEmpty())
        return e;
    QSqlQuery q(db);
    if (!q.exec(QStringLiteral("CREATE TABLE keep (a INTEGER)")) || !q.exec(QStringLiteral("INSERT INTO keep VALUES (1), (2), (3)")))
        return q.lastError().text();
    return {};
}

// Empty when the two fits' numbers agree to tol (relative, or absolute below 1); otherwise
// the first difference. By-participant fits also compare Hotelling's omnibus, each coefficient's df
// and participants, and the participants left out (by name, in order).
inline QString compareFits(const QJsonObject &a, const QJsonObject &b, double tol)
{
    const auto close = [tol](const QJsonValue &x, const QJsonValue &y) {
        if (x.isNull() || y.isNull())
            return x.isNull() && y.isNull();
        const double u = x.toDouble(), v = y.toDouble();
        return std::abs(u - v) <= tol * std::max({1.0, std::abs(u), std::abs(v)});
    };
    for (const char *key : {"sigma", "df", "r_squared", "f", "f_df1", "f_df2", "f_p", "n"})
        if (!close(a[QLatin1String(key)], b[QLatin1String(key)]))
            return QStringLiteral("%1: %2 vs %3").arg(QLatin1String(key)).arg(a[QLatin1String(key)].toDouble(), 0, 'g', 17)
                .arg(b[QLatin1String(key)].toDouble(), 0, 'g', 17);
    const auto compareArray = [&](const char *name, std::initializer_list<const char *> keys) -> QString {
        const QJsonArray x = a[QLatin1String(name)].toArray(), y = b[QLatin1String(name)].toArray();
        if (x.size() != y.size() || x.isEmpty())
            return QStringLiteral("%1: %2 vs %3 entries").arg(QLatin1String(name)).arg(x.size()).arg(y.size());
        for (qsizetype i = 0; i < x.size(); ++i) {
            const QJsonObject u = x[i].toObject(), v = y[i].toObject();
            if (u[QStringLiteral("name")] != v[QStringLiteral("name")])
                return QStringLiteral("%1[%2]: name %3 vs %4").arg(QLatin1String(name)).arg(i)
                    .arg(u[QStringLiteral("name")].toString(), v[QStringLiteral("name")].toString());
            for (const char *key : keys)
                if (!close(u[QLatin1String(key)], v[QLatin1String(key)]))
                    return QStringLiteral("%1[%2].%3: %4 vs %5").arg(QLatin1String(name)).arg(i).arg(QLatin1String(key))
                        .arg(u[QLatin1String(key)].toDouble(), 0, 'g', 17).arg(v[QLatin1String(key)].toDouble(), 0, 'g', 17);
        }
        return QString();
    };
    if (QString e = compareArray("levels", {"n", "mean", "sd"}); !e.isEmpty())
        return e;
    // By participant: each coefficient's df and participants, Hotelling's test and who was left out.
    const QJsonObject ox = a[QStringLiteral("omnibus")].toObject(), oy = b[QStringLiteral("omnibus")].toObject();
    for (const char *key : {"f", "df1", "df2", "p", "participants"})
        if (!close(ox[QLatin1String(key)], oy[QLatin1String(key)]))
            return QStringLiteral("omnibus.%1: %2 vs %3").arg(QLatin1String(key)).arg(ox[QLatin1String(key)].toDouble(), 0, 'g', 17)
                .arg(oy[QLatin1String(key)].toDouble(), 0, 'g', 17);
    if (a[QStringLiteral("participants")] != b[QStringLiteral("participants")])
        return QStringLiteral("participants: %1 vs %2")
            .arg(QString::fromUtf8(QJsonDocument(a[QStringLiteral("participants")].toObject()).toJson(QJsonDocument::Compact)),
                 QString::fromUtf8(QJsonDocument(b[QStringLiteral("participants")].toObject()).toJson(QJsonDocument::Compact)));
    return compareArray("coefficients", {"estimate", "se", "t", "p", "p_adjusted", "ci_low", "ci_high", "df", "participants"});
}

inline QJsonObject jsonOf(const QByteArray &out)
{
    return QJsonDocument::fromJson(out).object();
}

} // namespace cb::test
