#pragma once

#include "core/analysis/Analysis.h"

#include <QColor>
#include <QString>

class QLabel;
class QWidget;

namespace cb::look {

// How a property reads at a glance. Every state has a symbol and a word as
// well as a colour, so nothing depends on telling colours apart.
enum class State { Good, Caution, Problem, Neutral };

QString mark(State state);  // "✓", "!", "✗", "·"
QString word(State state);  // "fine", "caution", "problem", ""
QColor ink(State state);    // text and symbol colour
QColor tint(State state);   // cell background
// Plain text as one rich-text line in the state's ink, after its symbol: "! text".
QString markedLine(State state, const QString &plainText);

// Bars of the hypothesis pictures: weights above zero and below zero.
QColor raisedBar();
QColor loweredBar();
QColor baseline();
QColor quietText(); // defaults shown in grey (equal sizes, positions 1..k)
QColor footerBackground();

// The symbol for a value that is stored as a floating number, not an exact fraction.
QString approxMark(); // "≈"

// How a finding of the given severity reads (Info is neutral).
State ofSeverity(Finding::Severity severity);
// A bold caption above a part of a panel.
QLabel *caption(const QString &text, QWidget *parent);
// A wrapped label in the quiet colour, for hints and explanations.
QLabel *note(const QString &text, QWidget *parent);
// A long header title broken at the space nearest its middle, so that columns stay narrow.
QString twoLines(const QString &text, int longestLine = 16);
// Sets a label's text only when it differs (a rich-text label lays itself out again on every set).
void setText(QLabel *label, const QString &text);

} // namespace cb::look
