#include "ui/window/Demos.h"

#include "core/model/Study.h"

#include <QCoreApplication>

using namespace Qt::StringLiterals;

namespace cb {

QList<DemoStudy> demoStudies()
{
    auto tr = [](const char *text) { return QCoreApplication::translate("cb::Demos", text); };
    return {
        {u"irrigation"_s, tr("Irrigation trial: four schedules against no irrigation"), u":/demos/irrigation.json"_s},
        {u"roast"_s, tr("Roast tasting panel: trends over unevenly spaced temperatures"), u":/demos/roast.json"_s},
        {u"onboarding"_s, tr("Onboarding flows: one control, three variants, very unequal groups"), u":/demos/onboarding.json"_s},
        {u"hedgerow"_s, tr("Field margins \u00d7 mowing: a 3 \u00d7 2 crossed design with uneven plots"), u":/demos/hedgerow.json"_s},
    };
}

Result<Study> loadDemoStudy(const QString &name)
{
    QStringList known;
    for (const DemoStudy &d : demoStudies()) {
        if (d.name == name)
            return loadStudy(d.resourcePath);
        known << d.name;
    }
    return Result<Study>::failure(u"demo '%1' does not exist; the demos are: %2"_s.arg(name, known.join(u", "_s)));
}

} // namespace cb
