#pragma once

#include "core/model/Study.h"
#include "core/power/Power.h"

#include <QByteArray>
#include <QString>
#include <QStringList>

#include <optional>
#include <vector>

namespace cb {

// The study sheet: one document that puts a finished plan on record (a preregistration, a lab
// notebook, a methods appendix). Title and notes; the factors with their levels, planned n and
// codings; the coding and hypothesis matrices in exact fractions; each coefficient's hypothesis
// in words with its per-level picture; design health with its flags; power when settings are
// given; the cautions; the date, the tool's version and the SHA-256 of the study file.
//
// The HTML is self-contained (styles inline, pictures as inline SVG), deterministic (the same
// study and options give the same bytes) and well-formed XML as well as HTML, so that a strict
// parser reads it. Every text that comes from the user is escaped.

struct SheetOptions
{
    QString title;            // empty: the file's name, else the factor (or factors) named
    QString date;             // as written on the sheet (ISO "2026-12-02"); empty: today, UTC
    QString fileName;         // the study file's name, shown beside the checksum
    QByteArray fileBytes;     // the study file's bytes; empty: the study as Contrast Bench writes it
    std::optional<PowerSettings> power; // when set, the power table and curves
};

enum class SheetPictures {
    InlineSvg,       // <svg> elements in the page (browsers)
    ImageReferences, // <img src="picture:N"> with the SVG texts handed back (Qt's rich text)
};

struct StudySheet
{
    QString html;
    std::vector<QByteArray> pictures; // the SVG documents, for ImageReferences
    QString checksum;                 // hex SHA-256 written on the sheet
};

StudySheet studySheet(const Study &study, const SheetOptions &options, SheetPictures pictures = SheetPictures::InlineSvg);

// Two codings side by side (core/analysis/Compare.h) as a page of the same kind: the summary, each
// coefficient under both codings (label, hypothesis in symbols and words, picture) with the verdict
// under it, and the design health with what differs marked. The window shows it.
struct CodingComparison;
StudySheet comparisonPage(const CodingComparison &comparison, SheetPictures pictures = SheetPictures::InlineSvg);

// Text for HTML and XML content and attribute values: & < > " ' escaped.
QString htmlEscaped(QStringView text);

// One hypothesis row as an SVG picture (the bars of core/report/LevelBars.h with each level's
// name and weight), width x height in CSS pixels.
QByteArray levelBarsSvg(const std::vector<Weight> &row, const QStringList &levels, int width, int height);

} // namespace cb
