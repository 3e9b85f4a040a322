#pragma once

#include "core/base/Result.h"
#include "core/model/Study.h"

#include <QList>
#include <QString>

namespace cb {

// The demo studies shipped inside the program (resources/demos/*.json).
struct DemoStudy
{
    QString name;  // for --demo: "irrigation"
    QString title; // for the menu
    QString resourcePath;
};

QList<DemoStudy> demoStudies();
// Any demo, one factor or a design, read by loadStudy; or a message naming the known demos.
Result<Study> loadDemoStudy(const QString &name);

} // namespace cb
