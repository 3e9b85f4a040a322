#include "ui/sheet/SheetDocument.h"

#include "core/files/SchemeFile.h"

#include <QBuffer>
#include <QImage>
#include <QPageLayout>
#include <QPageSize>
#include <QPainter>
#include <QPdfWriter>
#include <QSvgRenderer>
#include <QTextDocument>
#include <QUrl>

using namespace Qt::StringLiterals;

namespace cb {

namespace {
// Pictures are drawn at this many device pixels per CSS pixel, so they stay sharp in print.
constexpr int kPictureScale = 4;
} // namespace

std::unique_ptr<QTextDocument> sheetTextDocument(const StudySheet &sheet)
{
    auto doc = std::make_unique<QTextDocument>();
    loadSheet(*doc, sheet);
    return doc;
}

void loadSheet(QTextDocument &document, const StudySheet &sheet)
{
    QTextDocument *doc = &document;
    for (size_t i = 0; i < sheet.pictures.size(); ++i) {
        QSvgRenderer renderer(sheet.pictures[i]);
        const QSize size = renderer.defaultSize();
        QImage image(size * kPictureScale, QImage::Format_ARGB32_Premultiplied);
        image.fill(Qt::white);
        {
            QPainter p(&image);
            p.setRenderHint(QPainter::Antialiasing);
            renderer.render(&p);
        }
        image.setDevicePixelRatio(kPictureScale);
        doc->addResource(QTextDocument::ImageResource, QUrl(u"picture:%1"_s.arg(i)), image);
    }
    doc->setHtml(sheet.html);
}

QString writeSheetPdf(const StudySheet &sheet, const QString &path)
{
    const auto doc = sheetTextDocument(sheet);
    // Written to memory first, then saved atomically: a failed write leaves no half file.
    QBuffer buffer;
    buffer.open(QIODevice::WriteOnly);
    {
        QPdfWriter writer(&buffer);
        writer.setPageSize(QPageSize(QPageSize::A4));
        writer.setPageMargins(QMarginsF(18, 18, 18, 18), QPageLayout::Millimeter);
        writer.setTitle(doc->metaInformation(QTextDocument::DocumentTitle));
        writer.setCreator(u"Contrast Bench"_s);
        doc->print(&writer);
    }
    return writeFileAtomically(path, buffer.data());
}

} // namespace cb
