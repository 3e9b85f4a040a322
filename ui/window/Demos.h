#pragma once

#include "core/base/Result.h"
#include "core/files/StudyFile.h"
#include "core/model/Study.h"

#include <QList>
#include <QString>

namespace cb {

// The demo studies: those compiled into the program (resources/demos/*.json) and those installed
// beside it (<prefix>/share/contrast-bench/demos/*.json, found from the executable's folder). An
// installed file replaces the compiled-in demo of the same name; other installed files are added,
// titled by their name.
struct DemoStudy
{
    QString name;  // for --demo: "irrigation"
    QString title; // for the menu
    QString path;  // a Qt resource or an installed file
};

QList<DemoStudy> demoStudies();
// Where an installed program keeps its demos; empty before the application object exists.
QString installedDemoFolder();
// Any demo, one factor or a design, read by loadStudy; or a message naming the known demos.
Result<Study> loadDemoStudy(const QString &name);

} // namespace cb
