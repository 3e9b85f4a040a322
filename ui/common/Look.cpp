#include "ui/common/Look.h"
#include "ui/common/WrapLabel.h"

#include <QLabel>

#include <cstdlib>

using namespace Qt::StringLiterals;

namespace cb::look {

// Our palette: a deep teal for "fine", a burnt amber for "caution", a plum red
// for "problem". The three differ in lightness as well as hue, and every state
// also carries its own symbol.
QString mark(State state)
{
    switch (state) {
    case State::Good: return u"\u2713"_s;
    case State::Caution: return u"!"_s;
    case State::Problem: return u"\u2717"_s;
    case State::Neutral: break;
    }
    return u"\u00b7"_s;
}

QString word(State state)
{
    switch (state) {
    case State::Good: return u"fine"_s;
    case State::Caution: return u"caution"_s;
    case State::Problem: return u"problem"_s;
    case State::Neutral: break;
    }
    return {};
}

QColor ink(State state)
{
    switch (state) {
    case State::Good: return QColor(0x17, 0x6b, 0x5f);
    case State::Caution: return QColor(0x9a, 0x55, 0x00);
    case State::Problem: return QColor(0xa3, 0x1f, 0x4f);
    case State::Neutral: break;
    }
    return QColor(0x44, 0x4b, 0x55);
}

QString markedLine(State state, const QString &plainText)
{
    return QStringLiteral("<span style='color:%1'>%2 %3</span>").arg(ink(state).name(), mark(state), plainText.toHtmlEscaped());
}

QColor tint(State state)
{
    switch (state) {
    case State::Good: return QColor(0xe6, 0xf3, 0xf0);
    case State::Caution: return QColor(0xfd, 0xf0, 0xda);
    case State::Problem: return QColor(0xf9, 0xe1, 0xea);
    case State::Neutral: break;
    }
    return QColor(0xf4, 0xf5, 0xf7);
}

QColor raisedBar() { return QColor(0x2b, 0x6c, 0xb0); }
QColor loweredBar() { return QColor(0xd6, 0x7a, 0x1e); }
QColor baseline() { return QColor(0x5a, 0x60, 0x6b); }
QColor quietText() { return QColor(0x8a, 0x90, 0x99); }
QColor footerBackground() { return QColor(0xee, 0xf0, 0xf3); }
QString approxMark() { return u"\u2248"_s; }

State ofSeverity(Finding::Severity severity)
{
    switch (severity) {
    case Finding::Severity::Problem: return State::Problem;
    case Finding::Severity::Caution: return State::Caution;
    case Finding::Severity::Info: break;
    }
    return State::Neutral;
}

QLabel *caption(const QString &text, QWidget *parent)
{
    auto *l = new QLabel(text, parent);
    QFont f = l->font();
    f.setBold(true);
    l->setFont(f);
    return l;
}

QLabel *note(const QString &text, QWidget *parent)
{
    auto *l = new WrapLabel(text, parent);
    QPalette p = l->palette();
    p.setColor(QPalette::WindowText, ink(State::Neutral));
    l->setPalette(p);
    return l;
}

QString twoLines(const QString &text, int longestLine)
{
    if (text.size() <= longestLine || text.contains(u'\n'))
        return text;
    const qsizetype middle = text.size() / 2;
    qsizetype best = -1;
    for (qsizetype i = 0; i < text.size(); ++i)
        if (text[i] == u' ' && (best < 0 || std::abs(i - middle) < std::abs(best - middle)))
            best = i;
    if (best <= 0)
        return text;
    return text.left(best).trimmed() + u'\n' + text.mid(best + 1).trimmed();
}

void setText(QLabel *label, const QString &text)
{
    if (label->text() != text)
        label->setText(text);
}

} // namespace cb::look
