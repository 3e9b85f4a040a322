// Renders the SVG icon to the PNG sizes of the hicolor theme, at build time.
//   render-icons ICON.svg OUT_DIR SIZE...   writes OUT_DIR/SIZExSIZE/contrast-bench.png
#include <QDir>
#include <QGuiApplication>
#include <QImage>
#include <QPainter>
#include <QSvgRenderer>

#include <cstdio>

using namespace Qt::StringLiterals;

int main(int argc, char *argv[])
{
    qputenv("QT_QPA_PLATFORM", "offscreen");
    QGuiApplication app(argc, argv);
    const QStringList args = QGuiApplication::arguments();
    if (args.size() < 4) {
        std::fprintf(stderr, "usage: render-icons ICON.svg OUT_DIR SIZE...\n");
        return 2;
    }
    QSvgRenderer svg(args[1]);
    if (!svg.isValid()) {
        std::fprintf(stderr, "render-icons: %s: not a readable SVG file\n", qUtf8Printable(args[1]));
        return 1;
    }
    for (const QString &sizeText : args.mid(3)) {
        bool ok = false;
        const int size = sizeText.toInt(&ok);
        if (!ok || size < 8 || size > 1024) {
            std::fprintf(stderr, "render-icons: size '%s': expected a whole number of pixels from 8 to 1024\n", qUtf8Printable(sizeText));
            return 2;
        }
        QImage image(size, size, QImage::Format_ARGB32_Premultiplied);
        image.fill(Qt::transparent);
        QPainter painter(&image);
        svg.render(&painter);
        painter.end();
        const QString folder = u"%1/%2x%2"_s.arg(args[2]).arg(size);
        const QString out = folder + u"/contrast-bench.png"_s;
        if (!QDir().mkpath(folder) || !image.save(out, "PNG")) {
            std::fprintf(stderr, "render-icons: could not write %s\n", qUtf8Printable(out));
            return 1;
        }
    }
    return 0;
}
