#pragma once

#include <QMap>
#include <QString>
#include <QStringList>

#include <optional>

namespace cb {

// What the analyst typed into the power planner (the window's Power tab), kept as typed: texts,
// so that a value half typed or not yet valid is saved and comes back as it was. It belongs to
// the study: saved in study files under "power" (core/files/StudyFile.h), restored with undo,
// kept in the recovery file. settingsFromPlan (core/power/PowerPlanSettings.h) reads it into
// the numbers core's power functions take; the window and the command line both use it.
struct PowerPlanLevel
{
    QString expected;                  // the expected mean, or the difference from the baseline
    QString sd;                        // used with perLevelSd
    QString ratio = QStringLiteral("1"); // allocation ratio, used with Sizes::Ratios

    bool isDefault() const { return *this == PowerPlanLevel{}; }
    friend bool operator==(const PowerPlanLevel &, const PowerPlanLevel &) = default;
};

struct PowerPlan
{
    // Where the group sizes come from between participants: the factor's planned n when it has
    // them (FromFactor, until the analyst chooses), or allocation ratios with a total N.
    enum class Sizes { FromFactor, PlannedN, Ratios };

    QMap<QString, PowerPlanLevel> levels; // by level name (a design: by cell name); a renamed level starts empty
    bool differences = false;             // expected values are differences from `baseline`
    QString baseline;                     // a level name; the first level when empty or unknown
    QString sd = QStringLiteral("1");
    bool perLevelSd = false;
    Sizes sizes = Sizes::FromFactor;
    QString total;                        // total N, or within participants the number of participants
    QString correlation;                  // within participants: one common correlation
    bool fullMatrix = false;              // within participants: the k x k matrix instead
    QString correlations;                 // the matrix as typed or pasted, one row per line
    QString alpha = QStringLiteral("0.05");
    QString target = QStringLiteral("0.8");
    bool oneSided = false;
    QString adjustment = QStringLiteral("none"); // an adjustment id (core/analysis/Adjustment.h)

    bool isDefault() const { return *this == PowerPlan{}; }
    friend bool operator==(const PowerPlan &, const PowerPlan &) = default;
};

// Stable ids for files: "factor", "planned", "ratios".
QString powerPlanSizesId(PowerPlan::Sizes sizes);
std::optional<PowerPlan::Sizes> powerPlanSizesFromId(const QString &id);
QString powerPlanSizesIdList(); // "factor, planned or ratios"

// The plan with only the levels named in `levels` (and no entries left at their defaults); the
// baseline forgotten when it is not among them.
PowerPlan prunedPlan(PowerPlan plan, const QStringList &levels);

} // namespace cb
