// The study MIME type (resources/contrast-bench-mime.xml): shared-mime-info compiles it, and a MIME
// database that has it installed (here Qt's, as a file manager built on Qt sees it) recognises saved
// one-factor schemes and designs by their .cbstudy name and, without a known extension, by content,
// while other JSON stays plain JSON.
#include "core/files/SchemeFile.h"
#include "core/files/StudyFile.h"
#include "core/model/Scheme.h"
#include "core/model/Study.h"

#include <QFile>
#include <QMimeDatabase>
#include <QProcess>
#include <QTemporaryDir>
#include <QTest>

using namespace Qt::StringLiterals;

namespace {
const QString kStudyType = u"application/x-contrast-bench-study"_s;
}

class TestMimeType : public QObject
{
    Q_OBJECT
private slots:
    void initTestCase();
    void savedStudiesAreRecognised_data();
    void savedStudiesAreRecognised();
    void otherJsonStaysJson();
    void typeInheritsJson();

private:
    QTemporaryDir m_share; // a data folder with the MIME type installed, as <prefix>/share
    QTemporaryDir m_files;
};

void TestMimeType::initTestCase()
{
    QVERIFY(m_share.isValid() && m_files.isValid());
    const QString packages = m_share.filePath(u"mime/packages"_s);
    QVERIFY(QDir().mkpath(packages));
    QVERIFY(QFile::copy(QStringLiteral(CB_SOURCE_DIR "/resources/contrast-bench-mime.xml"), packages + u"/contrast-bench.xml"_s));
    // Only this folder and the system's: no user's own MIME types.
    qputenv("XDG_DATA_HOME", m_files.filePath(u"no-user-data"_s).toUtf8());
    qputenv("XDG_DATA_DIRS", (m_share.path() + u":/usr/share"_s).toUtf8());
    // shared-mime-info's own compiler must take the file without a complaint.
    QProcess compile;
    compile.start(u"update-mime-database"_s, {m_share.filePath(u"mime"_s)});
    QVERIFY2(compile.waitForFinished(60000), "update-mime-database did not finish");
    const QByteArray complaints = compile.readAllStandardError();
    QVERIFY2(compile.exitCode() == 0 && complaints.isEmpty(), complaints.constData());
    QVERIFY(QFile::exists(m_share.filePath(u"mime/mime.cache"_s)));
}

void TestMimeType::savedStudiesAreRecognised_data()
{
    QTest::addColumn<QString>("fileName");
    QTest::addColumn<bool>("design");
    QTest::newRow("scheme, .cbstudy") << u"plan.cbstudy"_s << false;
    QTest::newRow("scheme, no extension") << u"plan"_s << false;
    QTest::newRow("design, .cbstudy") << u"field.cbstudy"_s << true;
    QTest::newRow("design, no extension") << u"field"_s << true;
}

void TestMimeType::savedStudiesAreRecognised()
{
    QFETCH(QString, fileName);
    QFETCH(bool, design);
    const QString path = m_files.filePath(fileName);
    if (design) {
        auto study = cb::loadStudy(QStringLiteral(CB_SOURCE_DIR "/resources/demos/hedgerow.json"));
        QVERIFY2(study, qPrintable(study.error()));
        QVERIFY(study->isDesign());
        QCOMPARE(cb::saveStudy(*study, path), QString());
    } else {
        cb::Factor f;
        f.name = u"dose"_s;
        f.levels = {u"none"_s, u"low"_s, u"mid"_s, u"high"_s};
        auto scheme = cb::makeScheme(f, cb::SchemeKind::Helmert);
        QVERIFY2(scheme, qPrintable(scheme.error()));
        QCOMPARE(cb::saveScheme(*scheme, path), QString());
    }
    QCOMPARE(QMimeDatabase().mimeTypeForFile(path).name(), kStudyType);
}

void TestMimeType::otherJsonStaysJson()
{
    const QString path = m_files.filePath(u"settings.json"_s);
    QFile f(path);
    QVERIFY(f.open(QIODevice::WriteOnly));
    f.write(R"({"format": "something-else", "levels": ["a", "b"]})");
    f.close();
    QCOMPARE(QMimeDatabase().mimeTypeForFile(path).name(), u"application/json"_s);
}

void TestMimeType::typeInheritsJson()
{
    const QMimeType type = QMimeDatabase().mimeTypeForName(kStudyType);
    QVERIFY(type.isValid());
    QVERIFY(type.inherits(u"application/json"_s));
    QCOMPARE(type.comment(), u"Contrast Bench study"_s);
    QCOMPARE(type.suffixes(), QStringList{u"cbstudy"_s});
}

QTEST_GUILESS_MAIN(TestMimeType)
#include "TestMimeType.moc"
