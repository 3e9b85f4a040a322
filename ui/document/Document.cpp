#include "ui/document/Document.h"
#include "core/analysis/Settled.h"
#include "core/analysis/DesignAnalysis.h"

#include <QFileInfo>

using namespace Qt::StringLiterals;

namespace cb {

namespace {
// Each step keeps one copy of the study (SchemeCommand); for k = 50 one copy is about 200 KB.
constexpr int kUndoLimit = 500;
} // namespace

Document::Document(QObject *parent)
    : QObject(parent)
{
    m_undo.setUndoLimit(kUndoLimit);
    connect(&m_undo, &QUndoStack::cleanChanged, this, [this](bool clean) { emit modifiedChanged(!clean); });
    applyStudy(studyOf(starterScheme()));
}

QString Document::displayName() const
{
    if (m_filePath.isEmpty())
        return m_untitledName.isEmpty() ? tr("untitled") : m_untitledName;
    return QFileInfo(m_filePath).fileName();
}

void Document::edit(Scheme next, const QString &actionName, MergeId mergeId, const QString &mergeKey)
{
    editStudy(withActiveScheme(m_study, std::move(next)), actionName, mergeId, mergeKey);
}

void Document::editStudy(Study next, const QString &actionName, MergeId mergeId, const QString &mergeKey)
{
    Study after = settled(std::move(next));
    if (after == m_study)
        return; // an edit that changes nothing is no undo step
    m_undo.push(new SchemeCommand(this, std::move(after), actionName, mergeId, mergeKey));
}

void Document::reset(Scheme scheme, const QString &filePath)
{
    reset(studyOf(std::move(scheme)), filePath);
}

void Document::reset(Study study, const QString &filePath, const QString &untitledName)
{
    m_undo.clear();
    setFilePath(filePath, untitledName);
    applyStudy(settled(std::move(study)));
    m_undo.setClean();
}

void Document::restore(Scheme scheme, const QString &filePath)
{
    restore(studyOf(std::move(scheme)), filePath);
}

void Document::restore(Study study, const QString &filePath)
{
    m_undo.clear();
    setFilePath(filePath);
    editStudy(std::move(study), tr("Restore unsaved work"));
}

void Document::markSaved(const QString &filePath)
{
    setFilePath(filePath);
    m_undo.setClean();
}

Study Document::exchangeStudy(Study study)
{
    Study held = std::move(m_study);
    applyStudy(std::move(study));
    return held;
}

Problem Document::setActiveFactor(int factor)
{
    if (factor == m_study.active)
        return {};
    Result<Study> next = withActiveFactor(m_study, factor);
    if (!next)
        return next.problem();
    applyStudy(next.take());
    return {};
}

void Document::applyStudy(Study study)
{
    // An edit of the power plan alone changes no analysis (and ends no draft of the grids).
    const bool planOnly = m_revision > 0 && study.design == m_study.design && study.active == m_study.active
                          && study.cellSizeNote == m_study.cellSizeNote;
    m_study = std::move(study);
    if (!planOnly) {
        m_analysis = analyze(m_study.activeScheme());
        m_designAnalysis = m_study.isDesign() ? analyzeDesign(m_study.design) : DesignAnalysis{};
        ++m_codingRevision;
    }
    ++m_revision;
    emit changed();
}

void Document::setFilePath(const QString &filePath, const QString &untitledName)
{
    const QString name = filePath.isEmpty() ? untitledName : QString();
    if (filePath == m_filePath && name == m_untitledName)
        return;
    m_filePath = filePath;
    m_untitledName = name;
    emit filePathChanged(m_filePath);
}

Scheme Document::starterScheme()
{
    Factor f;
    f.name = u"group"_s;
    f.levels = {u"A"_s, u"B"_s, u"C"_s, u"D"_s};
    return makeScheme(f, SchemeKind::Treatment).take();
}

} // namespace cb
