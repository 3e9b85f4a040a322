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
    PowerPlan,     // one input of the power planner
};

// The one edit command. Every change to a document goes through it, so every change can be
// undone. It keeps one study, the one the document does not hold: the study after the edit
// until the first redo(), the study before it afterwards; undo() and redo() exchange it with
// the document's. An edit that merges into this one and brings the study back to where it
// was before makes the step obsolete, and QUndoStack drops it.
class SchemeCommand : public QUndoCommand
{
public:
    SchemeCommand(Document *document, Study after, const QString &text, MergeId mergeId = MergeId::None,
                  QString mergeKey = {});

    void undo() override;
    void redo() override;
    int id() const override;
    bool mergeWith(const QUndoCommand *other) override;

private:
    void exchange();

    Document *m_document;
    Study m_other;
    MergeId m_mergeId;
    QString m_mergeKey;
};

} // namespace cb
