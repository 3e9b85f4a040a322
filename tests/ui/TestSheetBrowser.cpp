// The study sheet in a real browser: headless Chromium (Debian's chromium) renders the example
// sheet in docs/ and takes a screenshot. The screenshot must not be blank (its pixels vary, and
// the pictures' bar colours are on it) and the browser's console must stay silent. A planted
// console.error in a control page shows that the console is read (the check cannot pass by deafness).
#include "tests/support/ProcessRunner.h"

#include <QColor>
#include <QFile>
#include <QImage>
#include <QTemporaryDir>
#include <QTest>

#include <cmath>

using namespace Qt::StringLiterals;

namespace {

struct Shot
{
    QImage image;
    QString console; // the page's console messages, one per line
    QString log;
};

// Chromium as root needs --no-sandbox; --enable-logging=stderr --v=0 writes console messages as
// "INFO:CONSOLE(line)] "message", source: ..." on standard error.
Shot screenshot(const QString &page, const QString &png, const QString &size)
{
    const auto run = cb::test::runProcess(u"chromium"_s,
                                          {u"--headless"_s, u"--no-sandbox"_s, u"--disable-gpu"_s, u"--hide-scrollbars"_s,
                                           u"--enable-logging=stderr"_s, u"--v=0"_s, u"--window-size="_s + size,
                                           u"--screenshot="_s + png, u"file://"_s + page},
                                          {}, 120000);
    Shot s;
    s.log = run.errText();
    for (const QString &line : s.log.split(u'\n'))
        if (line.contains(u":CONSOLE"_s))
            s.console += line + u"\n"_s;
    s.image.load(png);
    return s;
}

double greyStandardDeviation(const QImage &image)
{
    double sum = 0, squares = 0;
    const qint64 n = qint64(image.width()) * image.height();
    for (int y = 0; y < image.height(); ++y)
        for (int x = 0; x < image.width(); ++x) {
            const double g = qGray(image.pixel(x, y));
            sum += g;
            squares += g * g;
        }
    const double mean = sum / double(n);
    return std::sqrt(std::max(0.0, squares / double(n) - mean * mean));
}

// Pixels within a few units of the colour (antialiased edges aside).
qint64 pixelsOf(const QImage &image, QColor colour)
{
    qint64 count = 0;
    for (int y = 0; y < image.height(); ++y)
        for (int x = 0; x < image.width(); ++x) {
            const QColor c = image.pixelColor(x, y);
            if (std::abs(c.red() - colour.red()) < 6 && std::abs(c.green() - colour.green()) < 6 && std::abs(c.blue() - colour.blue()) < 6)
                ++count;
        }
    return count;
}

} // namespace

class TestSheetBrowser : public QObject
{
    Q_OBJECT

private slots:
    void consoleIsRead()
    {
        QTemporaryDir dir;
        const QString page = dir.filePath(u"control.html"_s);
        QFile f(page);
        QVERIFY(f.open(QIODevice::WriteOnly));
        f.write("<!DOCTYPE html><html><body><p>control</p><script>console.error('planted error')</script></body></html>");
        f.close();
        const Shot s = screenshot(page, dir.filePath(u"control.png"_s), u"400,300"_s);
        QVERIFY2(s.console.contains(u"planted error"_s), qPrintable(s.log.right(2000)));
    }

    void exampleSheetRendersWithoutConsoleMessages()
    {
        QTemporaryDir dir;
        const QString png = dir.filePath(u"sheet.png"_s);
        const Shot s = screenshot(QStringLiteral(CB_SOURCE_DIR "/docs/study-sheet/irrigation.html"), png, u"1000,2400"_s);
        QVERIFY2(!s.image.isNull(), qPrintable(s.log.right(2000)));
        QCOMPARE(s.image.size(), QSize(1000, 2400));
        QVERIFY2(s.console.isEmpty(), qPrintable(s.console));
        // Not blank: text and tables make the grey levels vary (a blank page has 0) ...
        const double sd = greyStandardDeviation(s.image);
        QVERIFY2(sd > 20.0, qPrintable(QString::number(sd)));
        // ... and the inline SVG pictures were drawn: the raised and lowered bar colours are there.
        QVERIFY(pixelsOf(s.image, QColor(0x2b, 0x6c, 0xb0)) > 2000);
        QVERIFY(pixelsOf(s.image, QColor(0xd6, 0x7a, 0x1e)) > 500);
        if (qEnvironmentVariableIsSet("CB_SCREENSHOT_DIR"))
            s.image.save(qEnvironmentVariable("CB_SCREENSHOT_DIR") + u"/study-sheet.png"_s);
    }
};

QTEST_MAIN(TestSheetBrowser)
#include "TestSheetBrowser.moc"
