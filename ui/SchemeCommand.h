#pragma once

#include "Scheme.h"

#include <QString>
#include <QUndoCommand>

namespace cb {

class Document;

// Which consecutive edits fold into one undo step (same id and same key).
enum class MergeId : int {
    None = -1,
    Weight = 1,       // one cell of the coding grid
    HypothesisWeight, // one cell of the hypothesis grid
    LevelName,
    PlannedN,
    Spacing,
    ColumnName,
    FactorName,
    Notes,
};

// The one edit command: the scheme before and after. Every change to a
// document goes through it, so every change can be undone.
class SchemeCommand : public QUndoCommand
{
public:
    SchemeCommand(Document *document, Scheme before, Scheme after, const QString &text,
                  MergeId mergeId = MergeId::None, QString mergeKey = {});

    void undo() override;
    void redo() override;
    int id() const override;
    bool mergeWith(const QUndoCommand *other) override;

private:
    Document *m_document;
    Scheme m_before;
    Scheme m_after;
    MergeId m_mergeId;
    QString m_mergeKey;
};

} // namespace cb
