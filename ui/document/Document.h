#pragma once

#include "core/analysis/Analysis.h"
#include "core/analysis/DesignAnalysis.h"
#include "core/model/Design.h"
#include "core/model/Scheme.h"
#include "ui/document/SchemeCommand.h"
#include "core/model/Study.h"

#include <QObject>
#include <QString>
#include <QUndoStack>

namespace cb {

// The open study: one factor's scheme or a design of 2-3 crossed factors, its
// undo history, its file and its latest analyses. scheme() is the active
// factor's scheme, which every one-factor panel shows and edits. Views change
// the document only through edit() (the active factor) or editStudy() (the
// design), both pushing a SchemeCommand. The analyses are recomputed once per
// change, before changed() is emitted.
class Document : public QObject
{
    Q_OBJECT

public:
    explicit Document(QObject *parent = nullptr);

    const Scheme &scheme() const { return m_study.activeScheme(); }
    const Analysis &analysis() const { return m_analysis; }
    const Study &study() const { return m_study; }
    bool isDesign() const { return m_study.isDesign(); }
    const Design &design() const { return m_study.design; }
    // The design's analysis over the cell means; empty unless isDesign().
    const DesignAnalysis &designAnalysis() const { return m_designAnalysis; }
    QUndoStack *undoStack() { return &m_undo; }

    // Path of the file this scheme was read from or saved to; empty when new.
    QString filePath() const { return m_filePath; }
    // The file name; without a file, the name given to reset (a demo's), or "untitled".
    QString displayName() const;
    // Unsaved changes, as the undo stack sees them.
    bool isModified() const { return !m_undo.isClean(); }
    // Number of changes so far (for autosave: has anything changed since?).
    quint64 revision() const { return m_revision; }
    // Number of changes of the study other than its power plan (for drafts that end when the
    // coding, the levels or the design change).
    quint64 codingRevision() const { return m_codingRevision; }

    // One undoable step named `actionName`. Consecutive edits with the same
    // merge id and key fold into one step (typing into the same cell).
    // The edit replaces the active factor (cell sizes follow its level names).
    void edit(Scheme next, const QString &actionName, MergeId mergeId = MergeId::None, const QString &mergeKey = {});
    // An edit of the study itself: factors added or removed, terms, cell sizes, active factor.
    void editStudy(Study next, const QString &actionName, MergeId mergeId = MergeId::None, const QString &mergeKey = {});
    // A whole swap (New, Open): history is cleared and the document is clean. Without a file,
    // untitledName names it in the title bar and the save prompt (a demo study's name).
    void reset(Scheme scheme, const QString &filePath);
    void reset(Study study, const QString &filePath, const QString &untitledName = {});
    // A swap that counts as an unsaved change (restoring recovered work).
    void restore(Scheme scheme, const QString &filePath);
    void restore(Study study, const QString &filePath);
    void markSaved(const QString &filePath);
    // Which factor the grid and the one-factor panels edit. A choice of view, not an edit: no
    // undo step, and the document stays as modified as it was (a later undo brings back the
    // factor that step was made on, with its study). The problem names the factor when there
    // is no such factor; empty on success.
    Problem setActiveFactor(int factor);

    // For SchemeCommand only: makes `study` the document's and hands back the one it held.
    Study exchangeStudy(Study study);

    // A small factor to start from: four levels, treatment coding.
    static Scheme starterScheme();

signals:
    // The scheme and its analysis changed (any edit, undo, redo or swap).
    void changed();
    void modifiedChanged(bool modified);
    void filePathChanged(const QString &filePath);

private:
    void applyStudy(Study study);
    void setFilePath(const QString &filePath, const QString &untitledName = {});

    Study m_study;
    Analysis m_analysis;
    DesignAnalysis m_designAnalysis;
    QUndoStack m_undo;
    QString m_filePath;
    QString m_untitledName;
    quint64 m_revision = 0;
    quint64 m_codingRevision = 0;
};

} // namespace cb
