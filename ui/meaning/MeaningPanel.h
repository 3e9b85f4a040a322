#pragma once

#include <QListView>
#include <QWidget>

class QLabel;

namespace cb {

class Document;
class MeaningModel;

// The list of coefficient cards; re-lays itself out when their texts change.
class MeaningList : public QListView
{
    Q_OBJECT

public:
    using QListView::QListView;
    void relayout() { scheduleDelayedItemsLayout(); }
};

// Beside the grid: what each coefficient tests, in symbols, in words and as a
// picture, updated as you type.
class MeaningPanel : public QWidget
{
    Q_OBJECT

public:
    explicit MeaningPanel(Document *document, QWidget *parent = nullptr);

    MeaningModel *model() const { return m_model; }
    QListView *view() const { return m_view; }
    // Highlights one coefficient's card (0 = intercept when there is one).
    void showCoefficient(int coefficient);

private:
    void follow();

    Document *m_document;
    MeaningModel *m_model;
    MeaningList *m_view;
    QLabel *m_header;
    QLabel *m_empty;
};

} // namespace cb
