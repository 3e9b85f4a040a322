// The real dialogs of DialogPrompter answer from the keyboard: each choice has its own Alt+letter
// (the platform's texts for Save and Discard carry none), and pressing it gives that answer.
#include "ui/common/Prompter.h"

#include <QAbstractButton>
#include <QApplication>
#include <QKeySequence>
#include <QMessageBox>
#include <QTest>
#include <QTimer>

using namespace Qt::StringLiterals;
using namespace cb;

namespace {

// Once the dialog is up: records its buttons' texts, then presses Alt+`letter` in it.
void pressWhenShown(Qt::Key letter, QStringList *texts)
{
    QTimer::singleShot(0, [letter, texts] {
        auto *box = qobject_cast<QMessageBox *>(QApplication::activeModalWidget());
        if (!box) {
            pressWhenShown(letter, texts); // not shown yet
            return;
        }
        QVERIFY(QTest::qWaitForWindowActive(box));
        const QList<QAbstractButton *> buttons = box->buttons();
        for (QAbstractButton *b : buttons)
            *texts << b->text();
        QTest::keyClick(box, letter, Qt::AltModifier);
    });
}

QStringList mnemonics(const QStringList &texts)
{
    QStringList keys;
    for (const QString &t : texts)
        if (const QKeySequence k = QKeySequence::mnemonic(t); !k.isEmpty())
            keys << k.toString();
    return keys;
}

} // namespace

class TestPrompter : public QObject
{
    Q_OBJECT

private slots:
    void unsavedChangesAnswerAltSAndAltD_data();
    void unsavedChangesAnswerAltSAndAltD();
    void recoveryAnswersAltRAndAltD();
};

void TestPrompter::unsavedChangesAnswerAltSAndAltD_data()
{
    QTest::addColumn<int>("key");
    QTest::addColumn<int>("answer");
    QTest::newRow("Alt+S saves") << int(Qt::Key_S) << int(Prompter::SaveChoice::Save);
    QTest::newRow("Alt+D discards") << int(Qt::Key_D) << int(Prompter::SaveChoice::Discard);
}

void TestPrompter::unsavedChangesAnswerAltSAndAltD()
{
    QFETCH(int, key);
    QFETCH(int, answer);
    DialogPrompter prompter;
    QStringList texts;
    pressWhenShown(Qt::Key(key), &texts);
    QCOMPARE(int(prompter.askSaveChanges(nullptr, u"study.cbstudy"_s)), answer);
    const QStringList keys = mnemonics(texts);
    QVERIFY2(keys.contains(u"Alt+S"_s) && keys.contains(u"Alt+D"_s), qPrintable(texts.join(u", "_s)));
    QCOMPARE(QSet<QString>(keys.begin(), keys.end()).size(), keys.size()); // no letter twice
}

void TestPrompter::recoveryAnswersAltRAndAltD()
{
    DialogPrompter prompter;
    QStringList texts;
    pressWhenShown(Qt::Key_R, &texts);
    QVERIFY(prompter.askRestoreRecovery(nullptr, u"Restore?"_s));
    QStringList keys = mnemonics(texts);
    keys.sort();
    QCOMPARE(keys, (QStringList{u"Alt+D"_s, u"Alt+R"_s}));
    texts.clear();
    pressWhenShown(Qt::Key_D, &texts);
    QVERIFY(!prompter.askRestoreRecovery(nullptr, u"Restore?"_s));
}

QTEST_MAIN(TestPrompter)
#include "TestPrompter.moc"
