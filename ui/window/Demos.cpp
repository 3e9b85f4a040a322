#include "ui/window/Demos.h"

#include "core/files/StudyFile.h"
#include "core/model/Study.h"

#include <QCoreApplication>
#include <QDir>

#include <algorithm>

using namespace Qt::StringLiterals;

namespace cb {

QList<DemoStudy> demoStudies()
{
    auto tr = [](const char *text) { return QCoreApplication::translate("cb::Demos", text); };
    QList<DemoStudy> demos = {
        {u"irrigation"_s, tr("Irrigation trial: four schedules against no irrigation"), u":/demos/irrigation.json"_s},
        {u"roast"_s, tr("Roast tasting panel: trends over unevenly spaced temperatures"), u":/demos/roast.json"_s},
        {u"onboarding"_s, tr("Onboarding flows: one control, three variants, very unequal groups"), u":/demos/onboarding.json"_s},
        {u"hedgerow"_s, tr("Field margins \u00d7 mowing: a 3 \u00d7 2 crossed design with uneven plots"), u":/demos/hedgerow.json"_s},
        {u"warmup"_s, tr("Choir warm-up: 2 routines between singers \u00d7 3 vowels within singers (a mixed design)"),
         u":/demos/warmup.json"_s},
    };
    const QString folder = installedDemoFolder();
    if (folder.isEmpty())
        return demos;
    for (const QFileInfo &file : QDir(folder).entryInfoList({u"*.json"_s}, QDir::Files | QDir::Readable, QDir::Name)) {
        const QString name = file.completeBaseName();
        const auto known = std::find_if(demos.begin(), demos.end(), [&](const DemoStudy &d) { return d.name == name; });
        if (known != demos.end())
            known->path = file.absoluteFilePath();
        else
            demos.append({name, name, file.absoluteFilePath()});
    }
    return demos;
}

QString installedDemoFolder()
{
    if (!QCoreApplication::instance())
        return {};
    // CB_DEMO_FOLDER is the demo folder relative to the folder of the installed programs.
    return QDir::cleanPath(QDir(QCoreApplication::applicationDirPath()).filePath(QString::fromUtf8(CB_DEMO_FOLDER)));
}

Result<Study> loadDemoStudy(const QString &name)
{
    QStringList known;
    for (const DemoStudy &d : demoStudies()) {
        if (d.name == name)
            return loadStudy(d.path);
        known << d.name;
    }
    return Result<Study>::failure(u"demo '%1' does not exist; the demos are: %2"_s.arg(name, known.join(u", "_s)));
}

} // namespace cb
