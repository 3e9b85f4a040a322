#pragma once

#include "core/base/Result.h"
#include "core/model/Scheme.h"
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
// The demo's scheme, or a message naming the known demos (one-factor demos only).
Result<Scheme> loadDemo(const QString &name);
// Any demo: one factor or a design.
Result<Study> loadDemoStudy(const QString &name);

} // namespace cb
