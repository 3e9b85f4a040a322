#pragma once

#include "core/model/Study.h"

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
    CellSize,      // one cell of the design's planned n
};

// The one edit command: the study (one factor's scheme, or a design of several)
// before and after. Every change to a document goes through it, so every change
// can be undone.
class SchemeCommand : public QUndoCommand
{
public:
    SchemeCommand(Document *document, Study before, Study after, const QString &text,
                  MergeId mergeId = MergeId::None, QString mergeKey = {});

    void undo() override;
    void redo() override;
    int id() const override;
    bool mergeWith(const QUndoCommand *other) override;

private:
    Document *m_document;
    Study m_before;
    Study m_after;
    MergeId m_mergeId;
    QString m_mergeKey;
};

} // namespace cb
