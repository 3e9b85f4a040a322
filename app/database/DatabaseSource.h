#pragma once
// Runs the summary query (core/data/SummaryQuery.h) in a database through Qt SQL. Only the
// programs link this library (and with it Qt6::Sql): the command line uses it directly, the
// window gets it handed in from app/gui/main.cpp as a SummaryRowSource.

#include "core/base/Result.h"
#include "core/data/SummaryQuery.h"

#include <QString>

namespace cb {

// Where the data live, from a URL: sqlite:///path/to/file.db, postgresql://user@host:5432/dbname
// (or postgres://), odbc:DSN (or odbc:a full ODBC connection string). A password is never taken
// from the URL: PostgreSQL reads PGPASSWORD or ~/.pgpass, ODBC its DSN.
struct DatabaseLocation
{
    QString driver;   // QSQLITE, QPSQL or QODBC
    QString label;    // the URL as shown in messages
    QString database; // file, database name, or DSN
    QString host;
    int port = -1;
    QString user;
    QString connectOptions; // read-only where the driver allows
};
Result<DatabaseLocation> parseDatabaseUrl(const QString &url);

// A source that opens the database read-only, checks that the table and the columns are there
// and the response (and weight) hold numbers, runs the one SELECT and returns its rows. Every
// message names the database, the table or column, and what was expected.
SummaryRowSource databaseRowSource(const DatabaseLocation &location);

// The name of the data in messages and in the fit's JSON: "sqlite:///d.db, table 'visits'".
QString databaseSourceName(const DatabaseLocation &location, const QString &table);

// Everything in one, for the programs: parse the URL, write and run the query, and read the
// rows as a summary table.
Result<DataSummary> readDatabaseSummary(const QString &url, const SummaryQuerySpec &spec);

} // namespace cb
