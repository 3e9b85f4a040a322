// The cached text path (ui/common/CachedText) draws what the style and QPainter::drawText draw,
// pixel for pixel where it takes over, and leaves elided text to the style; the findings list does
// not repaint when an edit leaves the findings as they were.
#include "ui/common/CachedText.h"
#include "ui/document/Document.h"
#include "ui/health/FindingsModel.h"
#include "core/model/Scheme.h"

#include <QApplication>
#include <QHeaderView>
#include <QHelpEvent>
#include <QImage>
#include <QListView>
#include <QPainter>
#include <QSignalSpy>
#include <QStandardItemModel>
#include <QStyledItemDelegate>
#include <QTableView>
#include <QTest>
#include <QToolTip>

using namespace Qt::StringLiterals;
using namespace cb;

class TestCachedText : public QObject
{
    Q_OBJECT

private slots:
    void tableCellsLookTheSame();
    void wrappedRowsLookTheSame();
    void drawTextLooksTheSame_data();
    void drawTextLooksTheSame();
    void onlyDefaultDelegatesAreReplaced();
    void unchangedFindingsDoNotRepaint();
    void listRowsAreAsTallAsTheirTextAtEveryWidth();
    void rememberedSizesAreTheStyles();
    void cutShortTextShowsWholeInItsTooltip();
};

namespace {

// The rectangle holding every pixel that differs from the background.
QRect inkOf(const QImage &image)
{
    const QRgb background = image.pixel(0, 0);
    QRect ink;
    for (int y = 0; y < image.height(); ++y)
        for (int x = 0; x < image.width(); ++x)
            if (image.pixel(x, y) != background)
                ink |= QRect(x, y, 1, 1);
    return ink;
}

// Pixels that differ between two images of the same size, and the largest channel difference.
std::pair<int, int> differenceOf(const QImage &a, const QImage &b)
{
    int count = 0, largest = 0;
    for (int y = 0; y < a.height(); ++y)
        for (int x = 0; x < a.width(); ++x) {
            const QRgb p = a.pixel(x, y), q = b.pixel(x, y);
            const int d = std::max({std::abs(qRed(p) - qRed(q)), std::abs(qGreen(p) - qGreen(q)), std::abs(qBlue(p) - qBlue(q))});
            count += d > 0;
            largest = std::max(largest, d);
        }
    return {count, largest};
}

QStandardItemModel *sampleTable(QObject *parent)
{
    auto *model = new QStandardItemModel(4, 3, parent);
    const QStringList texts = {u"1/3"_s, u"\u22122/7"_s, u"level 1"_s, u"0"_s, u"C vs A"_s, u"1/2 (A, B vs C)"_s,
                               u"linear"_s, u"\u2713 yes"_s, u"a name far too long to fit in the narrow cell here"_s,
                               u"7"_s, u"\u2717 no"_s, u"b2 low vs control"_s};
    for (int i = 0; i < texts.size(); ++i) {
        auto *item = new QStandardItem(texts[i]);
        if (i % 3 == 1)
            item->setTextAlignment(Qt::AlignRight | Qt::AlignVCenter);
        if (i == 4)
            item->setForeground(QColor(0xb0, 0x30, 0x30));
        if (i == 6)
            item->setCheckable(true);
        model->setItem(i / 3, i % 3, item);
    }
    return model;
}

QImage shotOf(QAbstractItemView &view)
{
    view.show();
    if (!QTest::qWaitForWindowExposed(&view))
        return {};
    return view.viewport()->grab().toImage();
}

} // namespace

// One view, shot with the style's delegate and then with the cached one, so that focus and
// window state are the same for both.
void TestCachedText::tableCellsLookTheSame()
{
    QStandardItemModel *model = sampleTable(this);
    QTableView view;
    view.setModel(model);
    view.resize(420, 200);
    view.setWordWrap(false);
    view.setCurrentIndex(model->index(1, 1)); // one selected cell: highlighted text colour
    const QImage a = shotOf(view);
    useCachedText(&view);
    QVERIFY(dynamic_cast<CachedTextDelegate *>(view.itemDelegate()));
    const QImage b = shotOf(view);
    QVERIFY(!a.isNull() && a.size() == b.size());
    // Every cell but the selected one is the same to the pixel. Light text on the highlight is
    // blended a shade differently on the cached path (white on blue, edges only): its glyphs must
    // cover the same box.
    const QRect selected = view.visualRect(model->index(1, 1));
    QImage a0 = a, b0 = b;
    QPainter(&a0).fillRect(selected, Qt::black);
    QPainter(&b0).fillRect(selected, Qt::black);
    const auto [count, largest] = differenceOf(a0, b0);
    qInfo("table: %d of %lld pixels differ outside the selected cell, by at most %d", count, qint64(a.width()) * a.height(), largest);
    QCOMPARE(count, 0);
    auto textInk = [&](const QImage &image) {
        QImage cell = image.copy(selected.adjusted(2, 2, -2, -2));
        // The highlight is the background: keep the pixels much lighter than it.
        for (int y = 0; y < cell.height(); ++y)
            for (int x = 0; x < cell.width(); ++x)
                cell.setPixel(x, y, qGray(cell.pixel(x, y)) > 200 ? qRgb(255, 255, 255) : qRgb(0, 0, 0));
        cell.setPixel(0, 0, qRgb(0, 0, 0));
        return inkOf(cell);
    };
    const QRect inkA = textInk(a), inkB = textInk(b);
    QVERIFY(inkA.width() > 10);
    QVERIFY(std::abs(inkA.left() - inkB.left()) <= 1 && std::abs(inkA.right() - inkB.right()) <= 1);
    QVERIFY(std::abs(inkA.top() - inkB.top()) <= 1 && std::abs(inkA.bottom() - inkB.bottom()) <= 1);
}

// A delegate that records, for each row it paints, how often the row's options were filled in:
// once on the cached paths, once more when the row goes on to QStyledItemDelegate::paint (the
// style's own way).
class CountingDelegate : public CachedTextDelegate
{
public:
    using CachedTextDelegate::CachedTextDelegate;
    mutable QMap<std::pair<int, int>, int> fills; // (row, column): options filled in its last paint

    void paint(QPainter *painter, const QStyleOptionViewItem &option, const QModelIndex &index) const override
    {
        m_filled = 0;
        CachedTextDelegate::paint(painter, option, index);
        fills[{index.row(), index.column()}] = m_filled;
    }

protected:
    void initStyleOption(QStyleOptionViewItem *option, const QModelIndex &index) const override
    {
        ++m_filled;
        CachedTextDelegate::initStyleOption(option, index);
    }

private:
    mutable int m_filled = 0;
};

// The pixels that differ between a shot of view with its delegate and one with delegate; -1 when
// the shots failed.
int differingPixels(QAbstractItemView &view, QAbstractItemDelegate *delegate, const char *what)
{
    const QImage a = shotOf(view);
    view.setItemDelegate(delegate);
    const QImage b = shotOf(view);
    if (a.isNull() || a.size() != b.size())
        return -1;
    const auto [count, largest] = differenceOf(a, b);
    qInfo("%s: %d of %lld pixels differ, by at most %d", what, count, qint64(a.width()) * a.height(), largest);
    return count;
}

// Rows that fit on one line and rows wrapped over several lines take the cached paths and look
// as the style draws them. In a table with word wrap, a cell whose lines do not all fit, or
// with a word longer than the cell is wide, is elided by the style itself.
void TestCachedText::wrappedRowsLookTheSame()
{
    auto *model = new QStandardItemModel(this);
    for (const QString &t : {u"\u2713  Nothing to flag: the columns are identifiable, well conditioned and orthogonal."_s,
                             u"i  Short."_s, u"\u26a0  Columns 1 and 2 are not orthogonal under the planned group sizes."_s})
        model->appendRow(new QStandardItem(t));
    QListView view;
    view.setModel(model);
    view.setWordWrap(true);
    view.setSpacing(2);
    view.setSelectionMode(QAbstractItemView::NoSelection); // as the findings list
    view.resize(220, 240);
    auto *counting = new CountingDelegate(&view);
    QCOMPARE(differingPixels(view, counting, "list"), 0);
    QVERIFY(view.visualRect(model->index(0, 0)).height() >= 2 * view.visualRect(model->index(1, 0)).height());
    QCOMPARE(counting->fills.values(), (QList<int>{1, 1, 1})); // every row cached

    auto *cells = new QStandardItemModel(2, 2, this);
    const QString words = u"Each coefficient is the mean of one level minus the mean of all."_s;
    cells->setItem(0, 0, new QStandardItem(words));
    cells->setItem(0, 1, new QStandardItem(u"b2_a_name_far_too_long_for_this_cell"_s));
    cells->setItem(1, 0, new QStandardItem(words));
    cells->setItem(1, 1, new QStandardItem(u"short"_s));
    QTableView table;
    table.setModel(cells);
    table.setWordWrap(true);
    table.setColumnWidth(0, 130);
    table.setColumnWidth(1, 130);
    table.setRowHeight(0, 90); // room for every line
    table.setRowHeight(1, 30); // room for two of them
    table.resize(320, 180);
    auto *countingCells = new CountingDelegate(&table);
    QCOMPARE(differingPixels(table, countingCells, "table"), 0);
    // Cached: the words with room for every line, and "short". The style's: the long name
    // (elided) and the words in the low row (cut after two lines).
    QCOMPARE(countingCells->fills.values(), (QList<int>{1, 2, 2, 1}));
}

void TestCachedText::drawTextLooksTheSame_data()
{
    QTest::addColumn<int>("flags");
    QTest::addColumn<QString>("text");
    QTest::newRow("centred value") << int(Qt::AlignCenter) << u"\u22121/2"_s;
    QTest::newRow("top left") << int(Qt::AlignLeft | Qt::AlignTop) << u"b1 level 2 vs level 1"_s;
    QTest::newRow("wrapped words") << int(Qt::TextWordWrap)
                                   << u"The mean of level 2 minus the mean of level 1, with the other levels left out."_s;
}

void TestCachedText::drawTextLooksTheSame()
{
    QFETCH(int, flags);
    QFETCH(QString, text);
    const QRect rect(10, 8, 180, 70);
    auto render = [&](bool cached) {
        QImage image(220, 100, QImage::Format_RGB32);
        image.fill(Qt::white);
        QPainter p(&image);
        p.setPen(Qt::black);
        if (cached)
            drawCachedText(&p, rect, flags, text);
        else
            p.drawText(rect, flags, text);
        return image;
    };
    const QImage a = render(false), b = render(true);
    // The same glyphs: the ink lies in the same box, give or take a pixel of rounding, and every
    // pixel is within a shade of the other.
    const QRect inkA = inkOf(a), inkB = inkOf(b);
    QVERIFY(!inkA.isEmpty());
    QVERIFY2(std::abs(inkA.left() - inkB.left()) <= 1 && std::abs(inkA.top() - inkB.top()) <= 1
                 && std::abs(inkA.right() - inkB.right()) <= 1 && std::abs(inkA.bottom() - inkB.bottom()) <= 1,
             qPrintable(u"ink %1,%2 %3x%4 vs %5,%6 %7x%8"_s.arg(inkA.x()).arg(inkA.y()).arg(inkA.width()).arg(inkA.height())
                            .arg(inkB.x()).arg(inkB.y()).arg(inkB.width()).arg(inkB.height())));
    const auto [count, largest] = differenceOf(a, b);
    qInfo("drawText: %d pixels differ, by at most %d", count, largest);
}

void TestCachedText::onlyDefaultDelegatesAreReplaced()
{
    QWidget root;
    auto *plain = new QTableView(&root);
    auto *own = new QTableView(&root);
    auto *mine = new QStyledItemDelegate(own);
    own->setItemDelegate(new CachedTextDelegate(own));
    auto *custom = new QListView(&root);
    class Other : public QStyledItemDelegate
    {
    public:
        using QStyledItemDelegate::QStyledItemDelegate;
    };
    // A delegate of another class (its metaObject is QStyledItemDelegate's too) is kept.
    auto *other = new Other(custom);
    custom->setItemDelegate(other);
    Q_UNUSED(mine);
    useCachedText(&root);
    QVERIFY(dynamic_cast<CachedTextDelegate *>(plain->itemDelegate()));
    QVERIFY(dynamic_cast<CachedTextDelegate *>(own->itemDelegate()));
    QCOMPARE(custom->itemDelegate(), other);
}

void TestCachedText::unchangedFindingsDoNotRepaint()
{
    Document document;
    Factor f;
    f.name = u"dose"_s;
    f.levels = {u"none"_s, u"low"_s, u"high"_s};
    document.reset(makeScheme(f, SchemeKind::Treatment).take(), {});
    FindingsModel findings(&document);
    QSignalSpy spy(&findings, &QAbstractItemModel::dataChanged);

    // Renaming the factor changes no finding.
    Scheme renamed = document.scheme();
    renamed.factor.name = u"dosage"_s;
    document.edit(renamed, u"rename"_s);
    QCOMPARE(spy.count(), 0);

    // Weights that break the sums to zero do.
    Scheme typed = document.scheme();
    typed.kind = SchemeKind::Custom;
    typed.columns[0].weights[0] = Weight::exact(Rational(5));
    document.edit(typed, u"type"_s);
    QVERIFY(spy.count() > 0);
}

// Sizes come from the style the first time and from memory after: the same either way, for
// one-line and wrapped items, at each width a wrapped item is measured at.
// Every row of a list with word wrap and spacing is as tall as its text needs at the width it is
// painted, at every width of a short (scrolling) list. In the window, the findings list painted
// rows measured at its contents' width (which includes the spacing) inside slots laid out at the
// width less the spacing, and cut their text off ("common ..."); CachedTextDelegate now measures
// a list's rows at most as wide as the list paints them. That case was seen and fixed under Xvfb
// (the onboarding demo, two typed weights); this test did not reproduce it offscreen, and holds
// the rule for lists in general.
void TestCachedText::listRowsAreAsTallAsTheirTextAtEveryWidth()
{
    auto *model = new QStandardItemModel(this);
    for (const QString &t : {u"\u2717  Column 1 ('column 1') has VIF 14.77 (10 or more: serious collinearity, common practice)"_s,
                             u"\u2717  Column 2 ('column 2') has VIF 25.34 (10 or more: serious collinearity, common practice)"_s,
                             u"i  3 of 3 column pairs are not orthogonal under the planned n (centred, n-weighted cross-product in brackets): 1 and 2 (25400/243)"_s})
        model->appendRow(new QStandardItem(t));
    QListView view;
    view.setModel(model);
    view.setWordWrap(true);
    view.setSpacing(2);
    useCachedText(&view);
    view.resize(260, 120); // short: the rows scroll, as in the window's findings list
    view.show();
    QVERIFY(QTest::qWaitForWindowExposed(&view));
    int shortRows = 0;
    for (int width = 180; width <= 420; ++width) {
        view.resize(width, 120);
        view.doItemsLayout();
        for (int r = 0; r < model->rowCount(); ++r) {
            const QModelIndex index = model->index(r, 0);
            const QRect painted = view.visualRect(index); // the rect a paint of the row gets
            QStyleOptionViewItem option;
            option.initFrom(view.viewport());
            option.text = index.data().toString();
            option.features = QStyleOptionViewItem::WrapText | QStyleOptionViewItem::HasDisplay;
            option.displayAlignment = Qt::AlignLeft | Qt::AlignVCenter;
            option.rect = QRect(0, 0, painted.width(), 1);
            const int needed = view.style()->sizeFromContents(QStyle::CT_ItemViewItem, &option, QSize(), &view).height();
            shortRows += painted.height() < needed;
        }
    }
    QCOMPARE(shortRows, 0);
}

void TestCachedText::rememberedSizesAreTheStyles()
{
    QStandardItemModel model;
    for (const QString &t : {u"1/3"_s, u"\u22122/7"_s, u"\u2713  Nothing to flag: the columns are identifiable, well conditioned and orthogonal."_s,
                             u"\u26a0  Columns 1 and 2 are not orthogonal under the planned group sizes."_s})
        model.appendRow(new QStandardItem(t));
    auto *bold = new QStandardItem(u"1/3"_s);
    QFont font;
    font.setBold(true);
    bold->setFont(font);
    model.appendRow(bold);
    QListView view;
    view.setModel(&model);
    QStyledItemDelegate style;
    CachedTextDelegate cached;
    QStyleOptionViewItem option;
    option.widget = &view;
    option.font = view.font();
    option.fontMetrics = view.fontMetrics();
    for (const bool wrap : {false, true})
        for (const int width : {0, 80, 150, 400})
            for (int pass = 0; pass < 2; ++pass)
                for (int row = 0; row < model.rowCount(); ++row) {
                    QStyleOptionViewItem o = option;
                    o.rect = QRect(0, 0, width, 20);
                    if (wrap)
                        o.features |= QStyleOptionViewItem::WrapText;
                    const QModelIndex i = model.index(row, 0);
                    QCOMPARE(cached.sizeHint(o, i), style.sizeHint(o, i));
                }
}

// A name cut short to fit its cell (elided) shows whole in the cell's tooltip; a name that fits,
// or a cell with a tooltip of its own, keeps what it had.
void TestCachedText::cutShortTextShowsWholeInItsTooltip()
{
    const QString longName = u"lip trills vs humming \u00d7 ee vs ah [between \u00d7 within] <b>&"_s;
    QStandardItemModel model(3, 1);
    model.setItem(0, 0, new QStandardItem(u"ee vs ah"_s));
    model.setItem(1, 0, new QStandardItem(longName));
    auto *own = new QStandardItem(longName);
    own->setToolTip(u"a tooltip of its own"_s);
    model.setItem(2, 0, own);
    QTableView view;
    view.setModel(&model);
    view.setItemDelegate(new CachedTextDelegate(&view));
    view.setTextElideMode(Qt::ElideMiddle);
    view.setWordWrap(false); // as the result tables (setUpResultTable)
    view.horizontalHeader()->setStretchLastSection(false);
    view.setColumnWidth(0, 120);
    view.resize(300, 200);
    view.show();
    QVERIFY(QTest::qWaitForWindowExposed(&view));
    const auto tipAt = [&view](int row) {
        QToolTip::hideText();
        if (!QTest::qWaitFor([] { return !QToolTip::isVisible(); }, 3000))
            return u"(the last tooltip stayed)"_s;
        const QPoint at = view.visualRect(view.model()->index(row, 0)).center();
        QHelpEvent event(QEvent::ToolTip, at, view.viewport()->mapToGlobal(at));
        QApplication::sendEvent(view.viewport(), &event);
        return QToolTip::isVisible() ? QToolTip::text() : QString();
    };
    QCOMPARE(tipAt(0), QString()); // it fits
    QCOMPARE(tipAt(1), wholeTextTip(longName));
    QVERIFY(wholeTextTip(longName).contains(u"&lt;b&gt;&amp;"_s)); // shown as typed, not as markup
    QCOMPARE(tipAt(2), u"a tooltip of its own"_s);
    view.setColumnWidth(0, 600); // now it fits
    QCOMPARE(tipAt(1), QString());
}

QTEST_MAIN(TestCachedText)
#include "TestCachedText.moc"
