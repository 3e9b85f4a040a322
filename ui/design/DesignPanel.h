#pragma once

#include <QWidget>

class QLabel;
class QPushButton;
class QTableView;
class QTreeView;

namespace cb {

class CellPicture;
class CellTableModel;
class TermModel;
class Document;

// The study's design: its factors (one of them active, edited by the coding grid),
// the terms with their columns, the planned n per cell, and for the selected design
// column a picture of its hypothesis weights over the cells, with the hypothesis in
// words and the design's findings. Every number comes from the document's
// DesignAnalysis; this panel only lays it out.
class DesignPanel : public QWidget
{
    Q_OBJECT

public:
    explicit DesignPanel(Document *document, QWidget *parent = nullptr);

    // Design column (0-based, without the intercept) whose weights the picture shows.
    int selectedColumn() const { return m_column; }
    void selectColumn(int column);

    void addFactor();
    void removeFactor();           // the selected row of the factor table
    void makeActive(int factor);

    QTableView *factorTable() const { return m_factorView; }
    QTreeView *termTree() const { return m_termView; }
    QTableView *cellSizeTable() const { return m_cellView; }
    CellPicture *picture() const { return m_picture; }
    QString hypothesisText() const;
    QString findingsText() const;
    QString cellSizeNote() const;

signals:
    void message(const QString &text);

private:
    // The constructor's steps.
    void buildFactorPart();
    void buildDesignPart();

    void follow();
    void fillFactors();
    void fillTerms();
    void fillCellSizes();
    void fillPicture();
    void fillFindings();
    void termToggled(int term, bool include);
    void cellSizeTyped(int row, int column, QString text);

    Document *m_document;
    int m_column = 0;
    QLabel *m_intro;
    QWidget *m_designPart;
    CellTableModel *m_factors;
    QTableView *m_factorView;
    QPushButton *m_add;
    QPushButton *m_remove;
    QPushButton *m_activate;
    TermModel *m_terms;
    QTreeView *m_termView;
    CellTableModel *m_cellN;
    QTableView *m_cellView;
    QPushButton *m_equal;
    QLabel *m_cellNote;
    QLabel *m_columnTitle;
    CellPicture *m_picture;
    QLabel *m_hypothesis;
    QLabel *m_findings;
};

} // namespace cb
