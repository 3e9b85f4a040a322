#include "ui/document/SchemeCommand.h"

#include "ui/document/Document.h"

namespace cb {

SchemeCommand::SchemeCommand(Document *document, Study before, Study after, const QString &text, MergeId mergeId,
                             QString mergeKey)
    : QUndoCommand(text)
    , m_document(document)
    , m_before(std::move(before))
    , m_after(std::move(after))
    , m_mergeId(mergeId)
    , m_mergeKey(std::move(mergeKey))
{
}

void SchemeCommand::undo()
{
    m_document->applyStudy(m_before);
}

void SchemeCommand::redo()
{
    m_document->applyStudy(m_after);
}

int SchemeCommand::id() const
{
    return static_cast<int>(m_mergeId);
}

bool SchemeCommand::mergeWith(const QUndoCommand *other)
{
    const auto *o = static_cast<const SchemeCommand *>(other); // QUndoStack only merges commands with equal id()
    if (m_mergeId == MergeId::None || o->m_mergeKey != m_mergeKey)
        return false;
    m_after = o->m_after;
    setText(o->text());
    return true;
}

} // namespace cb
