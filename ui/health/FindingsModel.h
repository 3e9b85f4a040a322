#pragma once

#include "ui/document/DocumentTableModel.h"

namespace cb {

// Core's findings about the scheme in plain words, worst first.
class FindingsModel : public DocumentTableModel
{
    Q_OBJECT

public:
    explicit FindingsModel(Document *document, QObject *parent = nullptr);

    QVariant data(const QModelIndex &index, int role = Qt::DisplayRole) const override;

protected:
    Shape currentShape() const override;
    void aboutToFollow() override;
    bool showsChange() override;

private:
    std::vector<int> m_order; // indices into the analysis' findings, problems first
    // What the list shows (severity and words, in order), so an edit that leaves the findings as
    // they were does not repaint them: wrapped findings are the costliest rows of the window to lay out.
    QList<QPair<int, QString>> m_shown;
};

} // namespace cb
