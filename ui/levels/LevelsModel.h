#pragma once

#include "ui/document/DocumentTableModel.h"
#include "core/base/Result.h"
#include "core/model/Scheme.h"
#include "ui/document/SchemeCommand.h"

namespace cb {

// The factor's levels: name, planned group size, position for trends, and the
// level's role in the current standard scheme. Rows can be dragged to reorder.
class LevelsModel : public DocumentTableModel
{
    Q_OBJECT

public:
    enum Column { NameColumn, SizeColumn, PositionColumn, RoleColumn, ColumnCount };

    explicit LevelsModel(Document *document, QObject *parent = nullptr);

    QVariant data(const QModelIndex &index, int role = Qt::DisplayRole) const override;
    QVariant headerData(int section, Qt::Orientation orientation, int role = Qt::DisplayRole) const override;
    bool setData(const QModelIndex &index, const QVariant &value, int role = Qt::EditRole) override;
    Qt::ItemFlags flags(const QModelIndex &index) const override;

    // Structure edits, each one undo step. They say why when refused.
    bool addLevel();
    bool removeLevel(int level);
    bool moveLevel(int from, int to);
    bool useEqualSizes();
    bool useDefaultPositions();

    // Dragging rows to reorder them.
    Qt::DropActions supportedDropActions() const override;
    QStringList mimeTypes() const override;
    QMimeData *mimeData(const QModelIndexList &indexes) const override;
    bool dropMimeData(const QMimeData *data, Qt::DropAction action, int row, int column, const QModelIndex &parent) override;

signals:
    void editRefused(const QString &message);
    void editAccepted();

protected:
    Shape currentShape() const override;
    bool showsChange() override;

private:
    bool commit(const Result<Scheme> &next, const QString &actionName, MergeId mergeId = MergeId::None, const QString &mergeKey = {});
    QString roleOf(int level) const;

    // What the table showed last: the factor and the scheme's reference role.
    Factor m_shown;
    SchemeKind m_shownKind = SchemeKind::Custom;
    int m_shownReference = -1;
};

} // namespace cb
