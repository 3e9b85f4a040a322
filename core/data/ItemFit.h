#pragma once

#include "core/data/DataFit.h"
#include "core/model/Design.h"

#include <QJsonObject>
#include <QString>

#include <limits>
#include <vector>

namespace cb {

struct Scheme;

// Clark's (1973) min F': a lower bound of the quasi-F that treats participants and items both as
// random, from the by-participant F1 (error df df1) and the by-item F2 (error df df2):
//   min F' = F1 F2 / (F1 + F2), denominator df (F1 + F2)^2 / (F1^2 / df2 + F2^2 / df1),
// p from the F distribution with numeratorDf and that denominator. Clark, H. H. (1973), "The
// language-as-fixed-effect fallacy", Journal of Verbal Learning and Verbal Behavior 12, 335-359.
// NaN where F1 or F2 is not a number, or both are 0.
struct MinFPrime
{
    double f = std::numeric_limits<double>::quiet_NaN();
    double df1 = 1.0; // numerator df (1 for a contrast)
    double df2 = std::numeric_limits<double>::quiet_NaN();
    double p = std::numeric_limits<double>::quiet_NaN();
    double f1 = std::numeric_limits<double>::quiet_NaN(); // the by-participant F (t squared)
    double f2 = std::numeric_limits<double>::quiet_NaN(); // the by-item F
};
MinFPrime minFPrime(double f1, double df1, double f2, double df2, double numeratorDf = 1.0);

// The by-item analysis beside the by-participant one: the same analysis with the items in the
// role of participants (each item's cell means over the participants' rows; each contrast on the
// items' contrast scores, a one-sample t with I - 1 df; Hotelling's T^2 over the items with every
// level; items missing a level are listed and left out of the tests that need it), and min F' per
// coefficient (t^2 by participant with P - 1 df, t^2 by item with I - 1 df). It is not a
// mixed-effects model with crossed random effects for participants and items.
struct ItemAnalysis
{
    QString column;                // the item column's name
    FitResult byItem;              // as fitParticipants writes it, counting items where it says participants
    std::vector<MinFPrime> minF;   // one per coefficient, in the fit's order
};

// Refused, naming the item, its column and the line where it first appears: an item with values
// at one level only (the factor then varies between items, which this analysis does not cover).
Result<ItemAnalysis> fitItems(const Scheme &scheme, const DataSummary &data, const FitResult &byParticipant,
                              const FitOptions &options = {}, const LevelMapping &mapping = {});

// Adds "by_item" {column, count, complete, incomplete, coefficients: [the by-participant
// coefficient keys (name, estimate, se, t, p, p_adjusted, ci_low, ci_high, df, ...) with items
// for participants], omnibus: {test: "hotelling", hypothesis, f, df1, df2, p,
// items}, notes} and "min_f" [{name, f, df1, df2, p, f1, f2}] to a fit's JSON (fitResultToJson);
// its other keys stay as they are. Non-finite numbers are written as null.
void addItemAnalysisToJson(QJsonObject &fitJson, const ItemAnalysis &items);

// The by-item analysis of a design, beside its by-participant one (fitMixedParticipants). The data
// say how each factor varies over the items: within items when each item is seen at several of
// its levels (over the participants), between items when each is seen at one (a property of the
// item, such as its length). The design's columns are then tested on the items' scores as
// fitMixedParticipants tests a design with the items as units (the within-items factors as
// within, the between-items factors as groups); with every factor between items, the design is
// fitted between groups on the items' means. The by-item coefficients follow the by-participant
// fit's order, matched by name (the parts of a crossed name in any order), and min F' pairs them.
// Refused, naming the factor and two items with their column and lines: a factor seen at several
// levels for one item and at one level for another.
Result<ItemAnalysis> fitItems(const Design &design, const DataSummary &data, const FitResult &byParticipant,
                              const FitOptions &options = {}, const LevelMapping &mapping = {});

} // namespace cb
