#pragma once

#include "core/analysis/Adjustment.h"
#include "core/analysis/Analysis.h"
#include "core/data/DataReader.h"
#include "core/base/Result.h"

#include <Eigen/Dense>

#include <QHash>
#include <QJsonObject>
#include <QString>
#include <QStringList>

#include <optional>
#include <vector>

namespace cb {

struct Scheme;

// P(F > f) for an F with df1 and df2 degrees of freedom; NaN when it cannot be evaluated.
double fUpperTailP(double f, double df1, double df2);

// Adjusted p-values in the order given. NaN entries are left NaN and not counted in m.
std::vector<double> adjustPValues(const std::vector<double> &p, Adjustment method);

// Per-level statistics in the scheme's level order.
struct MatchedLevels
{
    QStringList levels;                // the scheme's levels
    std::vector<RunningStats> stats;   // one per scheme level
    std::vector<QStringList> sources;  // data names pooled into each level
};

// Data level name -> scheme level name. Several data names may map to one scheme
// level; their statistics are pooled.
using LevelMapping = QHash<QString, QString>;

// Parses "data=scheme, other=scheme2" into a mapping; the message names the item.
Result<LevelMapping> parseLevelMapping(const QString &text);

// Puts the data's levels in the scheme's order. Refuses, listing both sides, when
// a data level has no scheme level or a scheme level has no data; the mapping
// renames data levels first. A level whose rows all have weight 0 counts as absent.
Result<MatchedLevels> matchLevels(const QStringList &schemeLevels, const std::vector<LevelStats> &data,
                                  const LevelMapping &mapping = {});
// The same for data read from a file: when rows were left out, the refusal ends with the report
// of them, since a level whose every row was left out is missing for that reason.
Result<MatchedLevels> matchLevels(const QStringList &schemeLevels, const DataSummary &data, const LevelMapping &mapping = {});

struct FitOptions
{
    double alpha = 0.05; // confidence intervals at 1 - alpha
    Adjustment adjust = Adjustment::None;
};

struct FitCoefficient
{
    QString name;
    double estimate = 0.0;
    double se = 0.0;
    double t = 0.0;
    double p = 0.0;
    double pAdjusted = 0.0; // NaN for the intercept (not in the family of contrasts)
    double ciLow = 0.0;
    double ciHigh = 0.0;
    // The coefficient's hypothesis row applied to the observed level means.
    double hypothesisEstimate = 0.0;
    bool agrees = true;     // estimate and hypothesisEstimate agree to rounding
    bool inFamily = true;   // counted in the p-value adjustment
    QString hypothesis;     // e.g. "(2 weekly + twice)/3 - none", when known
    // By participant (fitParticipants): the t test's df (participants - 1) and the participants
    // with every level the hypothesis weighs; 0 for a between-groups fit.
    double df = kNoDf;
    int participants = 0;
    static constexpr double kNoDf = -1.0;
};

// A linear model y = X b + e with one design row per level, fitted from per-level
// sufficient statistics (count, mean, within-level sum of squares), never from an
// N-row design matrix. With case weights n is the sum of the weights.
struct FitResult
{
    QStringList levels;
    std::vector<RunningStats> levelStats;
    std::vector<FitCoefficient> coefficients;
    bool intercept = true;

    double totalN = 0.0;
    double df = 0.0;           // residual degrees of freedom, N - p
    double sigma = 0.0;        // residual SD; NaN when df = 0
    double rss = 0.0;          // residual sum of squares
    double tss = 0.0;          // total sum of squares (about the mean when centred)
    double rSquared = 0.0;
    // The omnibus F. When the columns span the constant (any model with an intercept,
    // or a cell-means coding without one) it tests that all level means are equal and
    // R squared is the usual centred one. Otherwise it tests that every coefficient is
    // zero (all fitted means 0) and R squared is uncentred, about 0.
    bool centred = true;
    QString omnibusHypothesis;
    double f = 0.0;
    double fDf1 = 0.0;
    double fDf2 = 0.0;
    double fP = 0.0;

    double alpha = 0.05;
    Adjustment adjust = Adjustment::None;

    Eigen::VectorXd fittedMeans;         // k
    Eigen::MatrixXd covariance;          // p x p, sigma^2 (X' N X)^-1
    // What the coefficients estimate at the observed sizes: (X' N X)^-1 X' N (p x k).
    // Equal to the scheme's hypotheses when the coding is saturated (p = k).
    Eigen::MatrixXd observedHypotheses;
    bool hypothesesAgree = true;
    QStringList notes;
    // Where the fit itself can mislead (a factor within participants fitted without a participant
    // column): said before the figures are read, in the report, the JSON and the window.
    QStringList cautions;

    // By participant (fitParticipants): f, fDf1, fDf2 and fP are Hotelling's T^2 as F over the
    // participants with every level.
    bool byParticipant = false;
    bool mixedDesign = false;         // by participant over a mixed design (core/data/MixedFit.h)
    int participants = 0;             // participants in the data
    int completeParticipants = 0;     // with a value at every level (the omnibus test's)
    QStringList incompleteParticipants; // "p7 (no 'invalid')", each with the levels it lacks
};

// Fits from levels in the design's order. X: k x p design rows ([1 | C] or C);
// H: p x k hypothesis rows (may be empty: then hypothesisEstimate is NaN);
// names: p coefficient names; intercept: the first column of X is the intercept
// (it is left out of the p-value adjustment).
Result<FitResult> fitLevels(const MatchedLevels &levels, const Eigen::MatrixXd &X, const Eigen::MatrixXd &H,
                            const QStringList &names, bool intercept, const FitOptions &options = {});

// (designRows, the design rows of a scheme, is in core/analysis/Analysis.h.)

// Everything in one: matches the data's levels to the scheme (with the mapping),
// builds X from the scheme's columns and H from analyze(scheme), and fits.
Result<FitResult> fitScheme(const Scheme &scheme, const DataSummary &data, const FitOptions &options = {},
                            const LevelMapping &mapping = {});

// The caution for data read without a participant column when the named factors are measured
// within participants: every row (or level summary) is then taken as independent.
QString independentRowsCaution(const QStringList &withinFactors);

// Each participant's cell means in the scheme's level order (participants x k, NaN where it has no
// row at a level; replicate rows averaged; the data's levels matched to the scheme with the
// mapping, which fitScheme has checked), and the line of its first row at each level (0: none).
struct ParticipantCells
{
    Eigen::MatrixXd means;
    std::vector<std::vector<qint64>> firstLines;
};
ParticipantCells participantCells(const Scheme &scheme, const DataSummary &data, const LevelMapping &mapping = {});

// The by-participant analysis of a factor measured within participants, from data read with a
// participant column: each participant's cell means (replicates averaged) in the scheme's level
// order; each coefficient's hypothesis row h applied to every participant with the levels h
// weighs gives contrast scores, tested by a one-sample t (mean, SE = SD / sqrt(P), P - 1 df, CI,
// adjusted p; no sphericity assumed); the omnibus test is Hotelling's (1931) T^2 on the k - 1
// differences from the first level over the participants with every level, as F(k - 1, P - k + 1).
// Participants missing a level are named and left out of the tests that need it. Refused with the
// participant named: one with values at one level only (is the factor between participants?).
Result<FitResult> fitParticipants(const Scheme &scheme, const DataSummary &data, const FitOptions &options = {},
                                  const LevelMapping &mapping = {});

// The multivariate linear hypothesis L B M = 0 in the model Y = X B + error, one row per
// participant (X: N x p, full column rank; Y: N x w; L: h x p; M: w x q): the hypothesis and error
// sums of squares and cross-products H = (LBM)' (L (X'X)^-1 L')^-1 (LBM) and E = M'Y'(I - X(X'X)^-1 X')YM
// with nu = N - p df, Wilks' (1932) lambda = det E / det(E + H), and Rao's (1951) F with a b and
// (nu - (a - b + 1) / 2) t - (a b - 2) / 2 df, a the columns of M, b the rows of L and
// t = sqrt((a^2 b^2 - 4) / (a^2 + b^2 - 5)) (1 when that denominator is not positive); exact when
// min(a, b) <= 2 (for b = 1 it is Hotelling's T^2). Refused, with the reason, when X is rank deficient or E is
// singular (fewer participants than the test needs, or scores that do not vary in every direction).
struct MultivariateTest
{
    double wilks = 0.0;
    double f = 0.0;
    double df1 = 0.0;
    double df2 = 0.0;
    double p = 0.0;
    bool exact = true;
};
Result<MultivariateTest> wilksTest(const Eigen::MatrixXd &X, const Eigen::MatrixXd &Y, const Eigen::MatrixXd &L, const Eigen::MatrixXd &M);

// {levels: [{name, n, mean, sd}], coefficients: [{name, estimate, se, t, p, p_adjusted,
//  ci_low, ci_high, hypothesis_estimate, hypothesis}], sigma, df, r_squared, f, f_df1,
//  f_df2, f_p, omnibus, alpha, adjust, n, notes, skipped_rows: {count, first: [{line, reason}]},
//  data: {source, summary_table, weighted, rows, used_rows}}.
// By participant, each coefficient gains df and participants, "omnibus" is an object {test:
// "hotelling", hypothesis, f, df1, df2, p, participants} and "participants" {count, complete,
// incomplete: [names with what they lack]}.
// Non-finite numbers are written as null.
QJsonObject fitResultToJson(const FitResult &fit, const DataSummary &data);

} // namespace cb
