#pragma once

#include "core/model/Scheme.h"

#include <QWidget>

class QCheckBox;
class QComboBox;
class QLabel;

namespace cb {

class Document;

// The bar above the grid: start from a standard scheme, pick its reference or
// base level and its options, switch the intercept. Shows "Custom" once the
// weights have been edited by hand.
class SchemePicker : public QWidget
{
    Q_OBJECT

public:
    explicit SchemePicker(Document *document, QWidget *parent = nullptr);

    // Applies a standard scheme as one undo step (what choosing it in the list does).
    bool applyStandard(SchemeKind kind);
    bool applyReference(int level);

    QComboBox *schemeBox() const { return m_scheme; }
    QComboBox *referenceBox() const { return m_reference; }

signals:
    void editRefused(const QString &message);

private:
    void follow();
    bool apply(SchemeKind kind, const SchemeOptions &options, const QString &actionName);
    SchemeOptions currentOptions(SchemeKind kind) const;

    Document *m_document;
    QComboBox *m_scheme;
    QLabel *m_referenceLabel;
    QComboBox *m_reference;
    QCheckBox *m_integer;
    QCheckBox *m_weighted;
    QCheckBox *m_intercept;
    QLabel *m_summary;
    QStringList m_shownLevels;
};

} // namespace cb
