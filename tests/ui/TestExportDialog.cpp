// The export dialog's preview is exactly core's exportTable text; copy and save
// use that text. The exporters themselves are checked in TestExport.

#include "ui/document/Document.h"
#include "ui/window/Demos.h"
#include "ui/export/ExportDialog.h"
#include "tests/support/PanelShot.h"
#include "tests/support/ScriptedPrompter.h"

#include <QAbstractButton>
#include <QPushButton>
#include <QClipboard>
#include <QDialogButtonBox>
#include <QFile>
#include <QGuiApplication>
#include <QPlainTextEdit>
#include <QTemporaryDir>
#include <QTest>

using namespace Qt::StringLiterals;
using namespace cb;

Q_DECLARE_METATYPE(cb::ExportFormat)

class TestExportDialog : public QObject
{
    Q_OBJECT

private slots:
    void previewIsCoreText_data();
    void previewIsCoreText();
    void copyPutsTextOnClipboard();
    void controlsAnswerTheirMnemonics();
    void saveWritesTheFile();
    void saveFailureNamesThePath();
    void rankDeficientShowsCoreMessage();
    void rendersTheIrrigationDemo();
};

void TestExportDialog::previewIsCoreText_data()
{
    QTest::addColumn<ExportFormat>("format");
    QTest::addColumn<bool>("coding");
    QTest::addColumn<bool>("exact");
    for (ExportFormat f : exportFormats())
        for (bool coding : {true, false})
            for (bool exact : {true, false})
                QTest::addRow("%s %s %s", qPrintable(exportFormatId(f)), coding ? "coding" : "hypotheses", exact ? "exact" : "decimal")
                    << f << coding << exact;
}

void TestExportDialog::previewIsCoreText()
{
    QFETCH(ExportFormat, format);
    QFETCH(bool, coding);
    QFETCH(bool, exact);

    Document doc;
    // Helmert weights have thirds and quarters, so exact and decimal texts differ.
    doc.reset(makeScheme(doc.scheme().factor, SchemeKind::Helmert).take(), {});
    ExportDialog dialog(&doc);
    dialog.setFormat(format);
    dialog.setMatrix(coding ? ExportDialog::Matrix::Coding : ExportDialog::Matrix::Hypotheses);
    dialog.setExact(exact);
    dialog.setVariableName(u"my weights"_s);

    const auto table = coding ? codingTable(doc.scheme()) : hypothesisTable(doc.analysis());
    QVERIFY(table.ok());
    const auto expected = exportTable(*table, format, ExportOptions{exact, u"my weights"_s});
    QVERIFY(expected.ok());
    QCOMPARE(dialog.text(), *expected);
    // The preview shows the same characters; a text box shows CSV's CRLF line ends as plain line breaks.
    QCOMPARE(dialog.preview()->toPlainText(), QString(*expected).replace(u"\r\n"_s, u"\n"_s));

    // The preview follows the document.
    doc.edit(makeScheme(doc.scheme().factor, SchemeKind::Sum).take(), u"sum"_s);
    const auto table2 = coding ? codingTable(doc.scheme()) : hypothesisTable(doc.analysis());
    QCOMPARE(dialog.text(), *exportTable(*table2, format, ExportOptions{exact, u"my weights"_s}));
}

void TestExportDialog::copyPutsTextOnClipboard()
{
    Document doc;
    ExportDialog dialog(&doc);
    dialog.setFormat(ExportFormat::R);
    dialog.copyToClipboard();
    QVERIFY(!dialog.text().isEmpty());
    QCOMPARE(QGuiApplication::clipboard()->text(), dialog.text());
}

// Every button and choice in the dialog has its own Alt+letter, and the letters work: Alt+H
// switches to the hypotheses, Alt+C copies what the preview shows.
void TestExportDialog::controlsAnswerTheirMnemonics()
{
    QGuiApplication::clipboard()->clear();
    Document doc;
    ExportDialog dialog(&doc);
    dialog.setFormat(ExportFormat::R);
    dialog.show();
    QVERIFY(QTest::qWaitForWindowActive(&dialog));
    QAbstractButton *close = dialog.findChild<QDialogButtonBox *>()->button(QDialogButtonBox::Close);
    QStringList letters;
    for (QAbstractButton *b : dialog.findChildren<QAbstractButton *>()) {
        if (!b->isVisible() || b == close)
            continue; // Close answers Escape
        const QKeySequence key = QKeySequence::mnemonic(b->text());
        QVERIFY2(!key.isEmpty(), qPrintable(b->text()));
        QVERIFY2(!letters.contains(key.toString()), qPrintable(b->text()));
        letters << key.toString();
    }
    QVERIFY(letters.size() >= 5);
    const QString coding = dialog.text();
    // A mnemonic clicks its button the way a mouse does, a moment later (QAbstractButton::animateClick).
    QTest::keyClick(&dialog, Qt::Key_H, Qt::AltModifier);
    QTRY_VERIFY(dialog.text() != coding);
    QTest::keyClick(&dialog, Qt::Key_C, Qt::AltModifier);
    QTRY_COMPARE(QGuiApplication::clipboard()->text(), dialog.text());
}

void TestExportDialog::saveWritesTheFile()
{
    QTemporaryDir dir;
    Document doc;
    ExportDialog dialog(&doc);
    dialog.setFormat(ExportFormat::Python);
    ScriptedPrompter prompter;
    dialog.setPrompter(&prompter);
    const QString path = dir.filePath(u"out.py"_s);
    prompter.savePath = path;
    QVERIFY(dialog.save());
    QCOMPARE(prompter.fileQuestions.size(), 1);
    QVERIFY(prompter.fileQuestions.first().start.endsWith(u".py"_s));
    QFile f(path);
    QVERIFY(f.open(QIODevice::ReadOnly));
    QCOMPARE(QString::fromUtf8(f.readAll()), dialog.text());

    // Cancelling the question writes nothing.
    prompter.savePath.clear();
    QVERIFY(!dialog.save());
}

void TestExportDialog::saveFailureNamesThePath()
{
    QTemporaryDir dir;
    Document doc;
    ExportDialog dialog(&doc);
    const QString path = dir.filePath(u"missing/sub/out.csv"_s);
    const QString error = dialog.saveTo(path);
    QVERIFY(!error.isEmpty());
    QVERIFY2(error.contains(path) || error.contains(QDir::toNativeSeparators(path)), qPrintable(error));
    QVERIFY(!QFile::exists(path));
}

void TestExportDialog::rankDeficientShowsCoreMessage()
{
    Document doc;
    Scheme s = doc.scheme();
    s.kind = SchemeKind::Custom;
    s.columns[1].weights = s.columns[0].weights; // two equal columns: rank deficient
    doc.edit(s, u"duplicate"_s);
    ExportDialog dialog(&doc);
    dialog.setMatrix(ExportDialog::Matrix::Hypotheses);
    const auto table = hypothesisTable(doc.analysis());
    QVERIFY(!table.ok());
    QCOMPARE(dialog.problem(), table.error());
    QVERIFY(dialog.text().isEmpty());
    QVERIFY(dialog.preview()->toPlainText().contains(table.error()));
    // The coding itself can still be written.
    dialog.setMatrix(ExportDialog::Matrix::Coding);
    QVERIFY(dialog.problem().isEmpty());
    QCOMPARE(dialog.text(), *exportTable(*codingTable(doc.scheme()), ExportFormat::Csv, ExportOptions{true, {}}));
}

void TestExportDialog::rendersTheIrrigationDemo()
{
    Document doc;
    doc.reset(loadDemoStudy(u"irrigation"_s).take(), {});
    ExportDialog dialog(&doc);
    dialog.setFormat(ExportFormat::R);
    dialog.setMatrix(ExportDialog::Matrix::Hypotheses);
    dialog.setVariableName(u"schedule_hypotheses"_s);
    QVERIFY(!dialog.text().isEmpty());
    QVERIFY(renderPanel(dialog, QSize(760, 520), u"export"_s));
}

QTEST_MAIN(TestExportDialog)
#include "TestExportDialog.moc"
