#pragma once

#include "core/report/StudySheet.h"

#include <QString>

#include <memory>

class QTextDocument;

namespace cb {

// The study sheet (core/report/StudySheet.h) as Qt's rich text, for the PDF and the printer: the
// same HTML with the pictures as images rendered from their SVG (Qt Svg). Needs Qt Gui only, so
// that the command line can write a PDF without the window (offscreen platform).
std::unique_ptr<QTextDocument> sheetTextDocument(const StudySheet &sheet);
// The same into a document that exists (a text browser's).
void loadSheet(QTextDocument &document, const StudySheet &sheet);

// Writes the sheet as a PDF through Qt's own PDF writer (A4, fonts embedded, text selectable and
// searchable). Returns an error message naming the file, or empty.
QString writeSheetPdf(const StudySheet &sheet, const QString &path);

} // namespace cb
