// Fuzz target: the weight parser and the number texts around it (parseWeight,
// storageString/display, doubleToString, recogniseFraction, list parsers).
#include "tests/fuzz/FuzzChecks.h"

#include "core/model/Factor.h"
#include "core/power/Power.h"
#include "core/base/Weight.h"

#include <charconv>
#include <cmath>
#include <cstring>

using namespace Qt::StringLiterals;
using namespace cb;

extern "C" int LLVMFuzzerTestOneInput(const std::uint8_t *data, std::size_t size)
{
    const QString text = fuzz::textOf(data, size);
    if (auto w = parseWeight(text)) {
        const double a = std::abs(w->value());
        fuzz::require(std::isfinite(a) && (w->isZero() || (a <= kWeightMaxMagnitude * (1 + 1e-15) && a >= kWeightMinMagnitude * (1 - 1e-15)))
                          ? QString() : u"accepted weight out of range: "_s + w->storageString(), "parseWeight");
        auto back = parseStoredWeight(w->storageString());
        fuzz::require(back && *back == *w ? QString() : u"storageString does not read back: "_s + w->storageString(), "storageString");
        fuzz::require(fuzz::checkNoNonFiniteNumber(w->display() + u' ' + w->display(true)), "display");
    }

    // The bytes as a double: the shortest text reads back, a recognised fraction is close.
    if (size >= sizeof(double)) {
        double d = 0;
        std::memcpy(&d, data, sizeof d);
        const QByteArray t = doubleToString(d).toLatin1();
        if (std::isfinite(d)) {
            double r = 0;
            auto [ptr, ec] = std::from_chars(t.constData(), t.constData() + t.size(), r);
            fuzz::require(ec == std::errc() && ptr == t.constData() + t.size() && r == d ? QString()
                              : u"doubleToString does not read back: "_s + QString::fromLatin1(t), "doubleToString");
            if (auto f = recogniseFraction(d)) {
                const double back = nearestDouble(*f);
                fuzz::require(std::abs(back - d) <= 2e-12 * std::max(1.0, std::abs(d)) ? QString()
                                  : u"recogniseFraction(%1) gave %2"_s.arg(QString::fromLatin1(t), rationalToString(*f)), "recogniseFraction");
            }
        }
    }

    // Lists as typed on the command line and in the window.
    const QStringList items = splitList(text);
    if (auto n = parseSizes(items, int(items.size()), u"n"_s)) {
        for (const Rational &r : *n)
            fuzz::require(r > 0 ? QString() : u"non-positive size accepted"_s, "parseSizes");
    }
    (void)parseSpacing(items, int(items.size()), u"spacing"_s);
    if (auto v = parseNumberList(text, u"numbers"_s)) {
        for (double x : *v)
            fuzz::require(std::isfinite(x) ? QString() : u"non-finite number accepted"_s, "parseNumberList");
    }
    return 0;
}
