#include "ui/document/SchemeCommand.h"

#include "ui/document/Document.h"

namespace cb {

SchemeCommand::SchemeCommand(Document *document, Study after, const QString &text, MergeId mergeId, QString mergeKey)
    : QUndoCommand(text)
    , m_document(document)
    , m_other(std::move(after))
    , m_mergeId(mergeId)
    , m_mergeKey(std::move(mergeKey))
{
}

void SchemeCommand::undo()
{
    exchange();
}

void SchemeCommand::redo()
{
    exchange();
}

void SchemeCommand::exchange()
{
    m_other = m_document->exchangeStudy(std::move(m_other));
}

int SchemeCommand::id() const
{
    return static_cast<int>(m_mergeId);
}

bool SchemeCommand::mergeWith(const QUndoCommand *other)
{
    // QUndoStack merges only commands with equal id(), after it has run other's redo(): the
    // document now holds the merged step's result, and m_other still holds the study before it.
    const auto *o = static_cast<const SchemeCommand *>(other);
    if (m_mergeId == MergeId::None || o->m_mergeKey != m_mergeKey)
        return false;
    setText(o->text());
    setObsolete(m_document->study() == m_other);
    return true;
}

} // namespace cb
