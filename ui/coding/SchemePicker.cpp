#include "ui/coding/SchemePicker.h"

#include "ui/document/Document.h"
#include "ui/common/Look.h"
#include "core/model/SchemeEdits.h"

#include <QCheckBox>
#include <QComboBox>
#include <QHBoxLayout>
#include <QLabel>
#include <QSignalBlocker>
#include <QVBoxLayout>

using namespace Qt::StringLiterals;

namespace cb {

SchemePicker::SchemePicker(Document *document, QWidget *parent)
    : QWidget(parent)
    , m_document(document)
    , m_scheme(new QComboBox(this))
    , m_referenceLabel(new QLabel(tr("Compared with:"), this))
    , m_reference(new QComboBox(this))
    , m_integer(new QCheckBox(tr("Whole-number weights"), this))
    , m_weighted(new QCheckBox(tr("Orthogonal under planned n"), this))
    , m_intercept(new QCheckBox(tr("Intercept"), this))
    , m_summary(look::note(QString(), this))
{
    for (SchemeKind k : standardSchemes())
        m_scheme->addItem(schemeTitle(k), schemeId(k));
    m_scheme->addItem(tr("Custom (typed by hand)"), schemeId(SchemeKind::Custom));
    m_scheme->setToolTip(tr("Start from a standard coding, then edit any weight: the scheme becomes custom."));
    m_reference->setSizeAdjustPolicy(QComboBox::AdjustToContents); // the whole name of the level, as it changes
    m_reference->setToolTip(tr("The reference level (treatment, simple) or the base level coded \u22121 (sum, weighted effect)."));
    m_integer->setToolTip(tr("Polynomial trends as the smallest whole numbers instead of unit-length columns."));
    m_weighted->setToolTip(tr("Make the polynomial trends orthogonal under the planned group sizes rather than equal ones."));
    m_intercept->setToolTip(tr("Fit an intercept. Without one, the coefficients are read against zero, not against each other."));

    auto *row = new QHBoxLayout;
    row->setContentsMargins(0, 0, 0, 0);
    auto *startLabel = new QLabel(tr("Start from:"), this);
    startLabel->setBuddy(m_scheme);
    m_referenceLabel->setBuddy(m_reference);
    row->addWidget(startLabel);
    row->addWidget(m_scheme);
    row->addSpacing(12);
    row->addWidget(m_referenceLabel);
    row->addWidget(m_reference);
    row->addWidget(m_integer);
    row->addWidget(m_weighted);
    row->addStretch(1);
    row->addWidget(m_intercept);
    auto *column = new QVBoxLayout(this);
    column->setContentsMargins(0, 0, 0, 0);
    column->setSpacing(2);
    column->addLayout(row);
    column->addWidget(m_summary);

    connect(m_scheme, &QComboBox::activated, this, [this](int i) {
        const auto kind = schemeFromId(m_scheme->itemData(i).toString());
        if (kind && *kind != SchemeKind::Custom)
            applyStandard(*kind);
        else
            follow();
    });
    connect(m_reference, &QComboBox::activated, this, [this](int i) { applyReference(i); });
    auto reapply = [this] {
        const SchemeKind kind = m_document->scheme().kind;
        if (kind == SchemeKind::Polynomial)
            apply(kind, currentOptions(kind), tr("Change polynomial options"));
    };
    connect(m_integer, &QCheckBox::clicked, this, reapply);
    connect(m_weighted, &QCheckBox::clicked, this, reapply);
    connect(m_intercept, &QCheckBox::clicked, this, [this](bool on) {
        m_document->edit(edits::withIntercept(m_document->scheme(), on), on ? tr("Add the intercept") : tr("Drop the intercept"));
    });
    connect(document, &Document::changed, this, &SchemePicker::follow);
    follow();
}

SchemeOptions SchemePicker::currentOptions(SchemeKind kind) const
{
    const Scheme &s = m_document->scheme();
    SchemeOptions o;
    if (schemeUsesReference(kind) && schemeUsesReference(s.kind) && s.reference >= 0)
        o.reference = s.reference;
    o.polynomialForm = m_integer->isChecked() ? PolynomialForm::Integer : PolynomialForm::Orthonormal;
    o.polynomialWeighted = m_weighted->isChecked();
    return o;
}

bool SchemePicker::apply(SchemeKind kind, const SchemeOptions &options, const QString &actionName)
{
    auto next = edits::withStandard(m_document->scheme(), kind, options);
    if (!next) {
        emit editRefused(tr("Not applied: %1").arg(next.error()));
        follow();
        return false;
    }
    m_document->edit(next.take(), actionName);
    return true;
}

bool SchemePicker::applyStandard(SchemeKind kind)
{
    return apply(kind, currentOptions(kind), tr("Start from %1 coding").arg(schemeTitle(kind)));
}

bool SchemePicker::applyReference(int level)
{
    const Scheme &s = m_document->scheme();
    if (!schemeUsesReference(s.kind) || level < 0 || level >= s.levelCount() || level == s.reference)
        return false;
    SchemeOptions o = currentOptions(s.kind);
    o.reference = level;
    return apply(s.kind, o, tr("Compare with \u2018%1\u2019").arg(s.factor.levels[level]));
}

void SchemePicker::follow()
{
    const Scheme &s = m_document->scheme();
    const QSignalBlocker b1(m_scheme), b2(m_reference), b3(m_integer), b4(m_weighted), b5(m_intercept);
    m_scheme->setCurrentIndex(m_scheme->findData(schemeId(s.kind)));
    if (m_shownLevels != s.factor.levels) {
        m_reference->clear();
        m_reference->addItems(s.factor.levels);
        m_shownLevels = s.factor.levels;
    }
    const bool usesReference = schemeUsesReference(s.kind);
    m_reference->setCurrentIndex(usesReference ? s.reference : -1);
    m_reference->setVisible(usesReference);
    m_referenceLabel->setVisible(usesReference);
    look::setText(m_referenceLabel, s.kind == SchemeKind::Sum || s.kind == SchemeKind::WeightedEffect ? tr("Base level (coded \u22121):")
                                                                                                : tr("Reference level:"));
    const bool polynomial = s.kind == SchemeKind::Polynomial;
    m_integer->setVisible(polynomial);
    m_weighted->setVisible(polynomial);
    m_integer->setChecked(s.polynomialForm == PolynomialForm::Integer);
    m_weighted->setChecked(s.polynomialWeighted);
    m_intercept->setChecked(s.intercept);
    look::setText(m_summary, s.kind == SchemeKind::Custom
                           ? tr("Custom: the weights were typed or edited by hand. The panels show what they test.")
                           : schemeSummary(s.kind));
}

} // namespace cb
