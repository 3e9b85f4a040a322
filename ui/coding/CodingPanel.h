#pragma once

#include <QWidget>

class QLabel;
class QMenu;
class QSplitter;
class QTableView;
class QTabWidget;
class QToolButton;

namespace cb {

class CodingModel;
class FooterStrip;
class Document;
class HypothesisModel;
class PairsModel;
class SchemePicker;
class WeightGridView;

// The middle of the window: the scheme picker, the coding grid with its
// footer indicators and the compact pairwise view, and the reverse direction
// (a grid of hypothesis weights). Refused edits are explained in a notice
// under the grids.
class CodingPanel : public QWidget
{
    Q_OBJECT

public:
    enum Direction { CodingDirection, HypothesisDirection };

    explicit CodingPanel(Document *document, QWidget *parent = nullptr);

    WeightGridView *codingView() const { return m_codingView; }
    WeightGridView *hypothesisView() const { return m_hypothesisView; }
    QTableView *pairsView() const { return m_pairsView; }
    CodingModel *codingModel() const { return m_coding; }
    HypothesisModel *hypothesisModel() const { return m_hypotheses; }
    SchemePicker *picker() const { return m_picker; }
    void showDirection(Direction direction);
    // The grid the user works in now.
    WeightGridView *activeView() const;

    // The menu of a coding column's name (right-click on its header): "Use the name '...'"
    // when the tool would name it otherwise, "Keep the name '...'" when it is out of date.
    // The caller owns it; null when there is nothing to offer.
    QMenu *columnNameMenu(int column);

    // The message under the grids (empty when hidden).
    QString notice() const;
    void showNotice(const QString &message);

public slots:
    void addColumn();
    void removeColumn();
    // The same from the hypothesis grid: a new comparison starts as a draft.
    void addComparison();
    void removeComparison();

signals:
    // The coding column the user is on changed (for the meaning list).
    void currentCoefficientChanged(int coefficient);
    void message(const QString &text);

protected:
    void resizeEvent(QResizeEvent *event) override;

private:
    void follow();
    void fitSplit();
    void removeCodingColumn(int column);
    QWidget *buildCodingTab();
    QWidget *buildHypothesisTab();

    Document *m_document;
    CodingModel *m_coding;
    HypothesisModel *m_hypotheses;
    PairsModel *m_pairs;
    SchemePicker *m_picker;
    QTabWidget *m_tabs;
    WeightGridView *m_codingView = nullptr;
    WeightGridView *m_hypothesisView = nullptr;
    FooterStrip *m_footer = nullptr;
    QTableView *m_pairsView = nullptr;
    QLabel *m_pairsCaption = nullptr;
    QSplitter *m_split = nullptr;
    bool m_splitMoved = false;
    QLabel *m_draftNotice = nullptr;
    QLabel *m_notice;
};

} // namespace cb
