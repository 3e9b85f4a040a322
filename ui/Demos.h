#pragma once

#include "Result.h"
#include "Scheme.h"

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
// The demo's scheme, or a message naming the known demos.
Result<Scheme> loadDemo(const QString &name);

} // namespace cb
