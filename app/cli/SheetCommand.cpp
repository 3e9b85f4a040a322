// The sheet subcommand: the study sheet as self-contained HTML or, in a build with the window's
// libraries, as PDF.
#include "app/cli/Commands.h"
#include "core/files/StudyFile.h"
#include "app/cli/SchemeArguments.h"

#include "core/files/InputFile.h"
#include "core/files/SchemeFile.h"
#include "core/model/Study.h"
#include "core/report/StudySheet.h"

#ifdef CB_SHEET_PDF
#include "ui/sheet/SheetDocument.h"
#endif

#include <QCommandLineParser>
#include <QDate>
#include <QFileInfo>

using namespace Qt::StringLiterals;

namespace cb::cli {

namespace {

int badInput(Io &io, const QString &message)
{
    return cli::badInput(io, u"sheet"_s, message);
}

} // namespace

bool sheetWritesPdf(const QStringList &args)
{
    for (qsizetype i = 0; i < args.size(); ++i) {
        const QString &a = args[i];
        if (a.startsWith(u"--format"_s))
            return (a == u"--format"_s ? args.value(i + 1) : a.mid(9)).trimmed().compare(u"pdf"_s, Qt::CaseInsensitive) == 0;
    }
    for (const QString &a : args)
        if (a.endsWith(u".pdf"_s, Qt::CaseInsensitive))
            return true;
    return false;
}

int runSheet(const QStringList &args, Io &io)
{
    QCommandLineParser p;
    addSchemeOptions(p);
    p.addOption({{u"o"_s, u"output"_s}, u"Where to write the sheet ('-' for standard output, HTML only)."_s, u"sheet.html"_s});
    p.addOption({u"format"_s, u"Output format (default: from the file's suffix): html, pdf."_s, u"html|pdf"_s});
    p.addOption({u"title"_s, u"The sheet's title (default: the study file's name)."_s, u"text"_s});
    p.addOption({u"date"_s, u"The date written on the sheet, as YYYY-MM-DD (default: today, UTC)."_s, u"YYYY-MM-DD"_s});
    if (const auto done = parseOrHelp(p, u"sheet"_s, args, io))
        return *done;
    if (!p.isSet(u"output"_s))
        return badInput(io, u"give -o FILE (.html or .pdf)"_s);
    const QString output = p.value(u"output"_s);
    QString format = p.value(u"format"_s).trimmed().toLower();
    if (format.isEmpty())
        format = output.endsWith(u".pdf"_s, Qt::CaseInsensitive) ? u"pdf"_s : u"html"_s;
    if (format != u"html"_s && format != u"pdf"_s)
        return badInput(io, u"--format: %1 is not a format; expected one of html, pdf"_s.arg(quoted(p.value(u"format"_s))));
    SheetOptions options;
    options.title = p.value(u"title"_s);
    if (p.isSet(u"date"_s)) {
        const QDate d = QDate::fromString(p.value(u"date"_s).trimmed(), Qt::ISODate);
        if (!d.isValid())
            return badInput(io, u"--date: %1 is not a date; expected YYYY-MM-DD, such as 2026-03-31"_s.arg(quoted(p.value(u"date"_s))));
        options.date = d.toString(Qt::ISODate);
    }
    Result<Study> study = Result<Study>::failure(QString());
    if (p.isSet(u"file"_s) && !p.isSet(u"no-intercept"_s) && !p.isSet(u"levels"_s)) {
        // Read once (standard input cannot be read twice): the study and the checksum of the file as given.
        for (const char16_t *opt : {u"scheme", u"columns", u"reference", u"spacing", u"n"})
            if (p.isSet(QString::fromUtf16(opt)))
                return badInput(io, u"--%1 cannot be combined with --file; edit the scheme file instead"_s.arg(QString::fromUtf16(opt)));
        const QString path = p.value(u"file"_s);
        auto bytes = readInput(path);
        if (!bytes)
            return badInput(io, bytes.error());
        options.fileBytes = bytes.take();
        options.fileName = path == u"-"_s ? u"standard input"_s : QFileInfo(path).fileName();
        study = studyFromJson(options.fileBytes, inputLabel(path));
    } else {
        // From --levels, or a file changed on the way (--no-intercept): no file to check, so the
        // checksum is of the study as Contrast Bench writes it.
        study = studyFromOptions(p);
    }
    if (!study)
        return badInput(io, study.error());
    if (format == u"pdf"_s) {
#ifdef CB_SHEET_PDF
        if (output == u"-"_s)
            return badInput(io, u"-o: a PDF is written to a file; give its name"_s);
        const StudySheet sheet = studySheet(study.value(), options, SheetPictures::ImageReferences);
        if (QString e = writeSheetPdf(sheet, output); !e.isEmpty()) {
            io.err << "contrast-bench-cli sheet: " << e << '\n';
            return kExitFailure;
        }
        return kExitOk;
#else
        return badInput(io, u"--format: this build has no PDF writer (built without the window's libraries); write html"_s);
#endif
    }
    const StudySheet sheet = studySheet(study.value(), options);
    if (output == u"-"_s) {
        io.out << sheet.html;
        return kExitOk;
    }
    if (QString e = writeFileAtomically(output, sheet.html.toUtf8()); !e.isEmpty()) {
        io.err << "contrast-bench-cli sheet: " << e << '\n';
        return kExitFailure;
    }
    return kExitOk;
}

} // namespace cb::cli
