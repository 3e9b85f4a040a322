// Fuzz target: the scheme-file loader, for one-factor schemes and designs of
// crossed factors. Whatever loads must be valid and survive a save and reload.
#include "tests/fuzz/FuzzChecks.h"

#include "core/files/StudyFile.h"
#include "core/model/Design.h"
#include "core/files/SchemeFile.h"

using namespace Qt::StringLiterals;
using namespace cb;

namespace {

// Loaded: valid, and saving then loading gives the same file.
template <typename T, typename Load, typename Save>
void checkRoundTrip(const Result<T> &loaded, Load load, Save save, const char *what)
{
    if (!loaded)
        return;
    fuzz::require(loaded->validate(), what);
    const QByteArray saved = save(*loaded);
    const Result<T> again = load(saved, u"saved.json"_s);
    fuzz::require(again ? QString() : u"a saved file does not load: "_s + again.error(), what);
    fuzz::require(save(*again) == saved ? QString() : u"the file changes when saved and loaded"_s, what);
}

} // namespace

extern "C" int LLVMFuzzerTestOneInput(const std::uint8_t *data, std::size_t size)
{
    const QByteArray bytes(reinterpret_cast<const char *>(data), qsizetype(size));
    if (isDesignJson(bytes))
        checkRoundTrip(designFromJson(bytes, u"fuzz.json"_s), designFromJson, designToJson, "design");
    checkRoundTrip(schemeFromJson(bytes, u"fuzz.json"_s), schemeFromJson, schemeToJson, "scheme");
    return 0;
}
