#pragma once

#include "Analysis.h"
#include "Scheme.h"
#include "SchemeCommand.h"

#include <QObject>
#include <QString>
#include <QUndoStack>

namespace cb {

// The open scheme: its value, its undo history, its file and its latest
// analysis. Views read from here and change it only through edit(), which
// pushes a SchemeCommand. The analysis is recomputed once per change, before
// changed() is emitted.
class Document : public QObject
{
    Q_OBJECT

public:
    explicit Document(QObject *parent = nullptr);

    const Scheme &scheme() const { return m_scheme; }
    const Analysis &analysis() const { return m_analysis; }
    QUndoStack *undoStack() { return &m_undo; }

    // Path of the file this scheme was read from or saved to; empty when new.
    QString filePath() const { return m_filePath; }
    // The file name, or "untitled" when there is none yet.
    QString displayName() const;
    // Unsaved changes, as the undo stack sees them.
    bool isModified() const { return !m_undo.isClean(); }
    // Number of changes so far (for autosave: has anything changed since?).
    quint64 revision() const { return m_revision; }

    // One undoable step named `actionName`. Consecutive edits with the same
    // merge id and key fold into one step (typing into the same cell).
    void edit(Scheme next, const QString &actionName, MergeId mergeId = MergeId::None, const QString &mergeKey = {});
    // A whole swap (New, Open): history is cleared and the document is clean.
    void reset(Scheme scheme, const QString &filePath);
    // A swap that counts as an unsaved change (restoring recovered work).
    void restore(Scheme scheme, const QString &filePath);
    void markSaved(const QString &filePath);

    // For SchemeCommand only.
    void applyScheme(const Scheme &scheme);

    // A small factor to start from: four levels, treatment coding.
    static Scheme starterScheme();

signals:
    // The scheme and its analysis changed (any edit, undo, redo or swap).
    void changed();
    void modifiedChanged(bool modified);
    void filePathChanged(const QString &filePath);

private:
    void setFilePath(const QString &filePath);

    Scheme m_scheme;
    Analysis m_analysis;
    QUndoStack m_undo;
    QString m_filePath;
    quint64 m_revision = 0;
};

} // namespace cb
