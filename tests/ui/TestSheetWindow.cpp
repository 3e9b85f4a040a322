// The window's File > Study sheet (HTML and PDF through the prompter; the print preview's document)
// and View > Compare with another coding (core's comparison page shown as rich text, with the
// pictures). With CB_SCREENSHOT_DIR set, the comparison view is saved as compare-view.png.
#include "core/report/StudySheet.h"
#include "ui/document/Document.h"
#include "ui/sheet/SheetDocument.h"
#include "ui/sheet/SheetWindow.h"

#include "tests/support/WindowFixture.h"

#include <QAction>
#include <QFile>
#include <QMenu>
#include <QMenuBar>
#include <QTextBrowser>
#include <QTextDocument>

using namespace Qt::StringLiterals;

namespace {

QAction *sheetAction(cb::MainWindow &w, const QString &startsWith)
{
    auto *menu = w.findChild<QMenu *>(u"studySheetMenu"_s);
    if (!menu)
        return nullptr;
    for (QAction *a : menu->actions())
        if (a->text().remove(u'&').startsWith(startsWith))
            return a;
    return nullptr;
}

} // namespace

class TestSheetWindow : public QObject
{
    Q_OBJECT

private slots:
    void htmlAndPdfAreWrittenWhereTheUserSays()
    {
        WindowFixture f;
        QVERIFY(f.window->openDemo(u"irrigation"_s));
        const QString html = f.dir.filePath(u"sheet.html"_s);
        const QString pdf = f.dir.filePath(u"sheet.pdf"_s);
        f.prompter.savePath = html;
        QAction *saveHtml = sheetAction(*f.window, u"Save as HTML"_s);
        QVERIFY(saveHtml);
        saveHtml->trigger();
        QCOMPARE(f.prompter.fileQuestions.last().suffix, u"html"_s);
        QFile h(html);
        QVERIFY(h.open(QIODevice::ReadOnly));
        const QString text = QString::fromUtf8(h.readAll());
        QVERIFY(text.contains(u"<h2>Hypothesis matrix</h2>"_s));
        // A demo is not a saved file: the checksum is of the study as it would be written.
        QVERIFY(text.contains(u"not saved: the checksum is of the study as Contrast Bench writes it"_s));

        f.prompter.savePath = pdf;
        sheetAction(*f.window, u"Save as PDF"_s)->trigger();
        QFile p(pdf);
        QVERIFY(p.open(QIODevice::ReadOnly));
        QVERIFY(p.read(5) == "%PDF-");
        QVERIFY(f.prompter.told.isEmpty());
    }

    // The preview prints the same document the PDF has: every picture is an image resource.
    void printDocumentHasThePictures()
    {
        WindowFixture f;
        QVERIFY(f.window->openDemo(u"irrigation"_s));
        const cb::StudySheet sheet = cb::studySheet(f.window->document()->study(), cb::documentSheetOptions(*f.window->document()),
                                                    cb::SheetPictures::ImageReferences);
        const auto doc = cb::sheetTextDocument(sheet);
        QCOMPARE(int(sheet.pictures.size()), 5);
        for (size_t i = 0; i < sheet.pictures.size(); ++i) {
            const QImage image = doc->resource(QTextDocument::ImageResource, QUrl(u"picture:%1"_s.arg(i))).value<QImage>();
            QVERIFY(!image.isNull());
        }
        QVERIFY(doc->toPlainText().contains(u"Estimates daily drip minus alternate-day drip."_s));
        QVERIFY(sheetAction(*f.window, u"Print"_s));
    }

    void compareViewShowsBothCodingsAndTheVerdicts()
    {
        WindowFixture f;
        QVERIFY(f.window->openDemo(u"irrigation"_s));
        cb::CompareDialog dialog(f.window->document(), &f.prompter, f.window.get());
        dialog.resize(1100, 900);
        dialog.compareWith(cb::SchemeKind::Treatment, 0);
        const QString text = dialog.page()->toPlainText();
        QVERIFY2(text.contains(u"The intercept changes meaning: under Custom it is the unweighted mean of the 5 level means; under "
                               "Treatment (dummy), reference none it is the mean of none."_s),
                 qPrintable(text.left(600)));
        QVERIFY(text.contains(u"Different: the first estimates the average of daily drip, alternate-day drip, weekly furrow and "
                              "fortnightly furrow minus none; the second estimates daily drip minus none."_s));
        QVERIFY(text.contains(u"condition number"_s));
        if (qEnvironmentVariableIsSet("CB_SCREENSHOT_DIR")) {
            dialog.show();
            QVERIFY(QTest::qWaitForWindowExposed(&dialog));
            QVERIFY(dialog.grab().save(qEnvironmentVariable("CB_SCREENSHOT_DIR") + u"/compare-view.png"_s));
        }
    }

    void compareWithAFileThatDoesNotFitSaysWhy()
    {
        WindowFixture f;
        QVERIFY(f.window->openDemo(u"irrigation"_s));
        cb::CompareDialog dialog(f.window->document(), &f.prompter, f.window.get());
        dialog.compareWithFile(QStringLiteral(CB_SOURCE_DIR "/resources/demos/roast.json"));
        QVERIFY2(dialog.page()->toPlainText().contains(u"the two codings must have the same levels"_s), qPrintable(dialog.page()->toPlainText()));
    }
};

QTEST_MAIN(TestSheetWindow)
#include "TestSheetWindow.moc"
