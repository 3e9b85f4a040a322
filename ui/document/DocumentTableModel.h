#pragma once

#include <QAbstractTableModel>

namespace cb {

class Document;

// Base of the window's thin table models. Each follows one Document: when a
// change keeps the table's shape it emits dataChanged for the cells that changed
// (emitChangedCells: views repaint only those) and headerDataChanged only for the
// header sections whose texts or looks changed (a header that resizes to its contents
// measures again only then); when the shape changes it resets.
class DocumentTableModel : public QAbstractTableModel
{
    Q_OBJECT

public:
    explicit DocumentTableModel(Document *document, QObject *parent = nullptr);

    int rowCount(const QModelIndex &parent = {}) const override;
    int columnCount(const QModelIndex &parent = {}) const override;
    Document *document() const { return m_document; }

protected:
    struct Shape
    {
        int rows = 0;
        int columns = 0;
        friend bool operator==(const Shape &, const Shape &) = default;
    };
    // The table's shape for the document as it is now.
    virtual Shape currentShape() const = 0;
    // Derived constructors call this once; afterwards it runs on every change.
    void follow();
    // Roles that may change with the document (custom roles are added by derived models).
    virtual QList<int> changedRoles() const;
    // Hook for derived models to drop cached state before the views hear of a change.
    virtual void aboutToFollow() {}
    // Whether a change that keeps the shape changed anything this model shows
    // (a model that shows only part of the scheme can say no and spare the repaint).
    virtual bool showsChange() { return true; }
    // After aboutToFollow, on a change that keeps the shape: whether the cell is drawn
    // differently from before (a model that remembers what it showed can say no for most
    // cells of a large table, so its views repaint only the cells that changed). Every cell
    // by default. A cell whose tooltip alone changed need not be told: views ask for a
    // tooltip when they show it.
    virtual bool cellChanged(int row, int column) const
    {
        Q_UNUSED(row);
        Q_UNUSED(column);
        return true;
    }

private:
    // What the header sections show, to tell which changed.
    QList<QVariantList> headerLook(Qt::Orientation orientation, int count) const;
    void emitChangedHeaders(Qt::Orientation orientation, int count, QList<QVariantList> &shown);

    Document *m_document;
    Shape m_shape;
    QList<QVariantList> m_columnHeaders;
    QList<QVariantList> m_rowHeaders;
};

} // namespace cb
