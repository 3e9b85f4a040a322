#pragma once

#include <QHash>
#include <QLabel>

namespace cb {

// A word-wrapped label that remembers its height for each width until its text, font or style
// changes. QLabel lays its text out anew on every heightForWidth() call, and a layout asks many
// times per pass: with a dozen wrapped labels in the docks, each edit that moved any size hint
// spent most of its time there (BenchWindow, BM_EditToPaint). Every wrapped label is one of these.
class WrapLabel : public QLabel
{
public:
    explicit WrapLabel(QWidget *parent = nullptr);
    WrapLabel(const QString &text, QWidget *parent);

    int heightForWidth(int width) const override;

protected:
    void changeEvent(QEvent *event) override;

private:
    mutable QString m_measured; // the text the heights below belong to
    mutable QHash<int, int> m_heights;
};

} // namespace cb
