#pragma once

// Texts rebuilt on every edit (hypotheses, findings) are written by appending into one plain
// buffer: a fraction of the cost of QString appends, joins or QString::arg, and one allocation
// for the finished QString. Internal to core.

#include "core/base/Weight.h"

#include <QLatin1StringView>
#include <QString>
#include <QStringView>

#include <algorithm>
#include <charconv>
#include <cstring>
#include <memory>

namespace cb {

class TextBuilder
{
public:
    TextBuilder() = default;
    TextBuilder(const TextBuilder &) = delete;
    TextBuilder &operator=(const TextBuilder &) = delete;

    TextBuilder &operator<<(QStringView v)
    {
        put(reinterpret_cast<const char16_t *>(v.utf16()), size_t(v.size()));
        return *this;
    }
    // A literal's length is known when compiling (QStringView would scan it for its end).
    template <size_t N>
    TextBuilder &operator<<(const char16_t (&literal)[N])
    {
        put(literal, N - 1);
        return *this;
    }
    TextBuilder &operator<<(char16_t c)
    {
        room(1);
        m_data[m_size++] = c;
        return *this;
    }
    TextBuilder &operator<<(QLatin1StringView v)
    {
        appendAscii(v.data(), v.data() + v.size());
        return *this;
    }
    // A whole number.
    TextBuilder &appendInt(long long v)
    {
        char buf[24];
        appendAscii(buf, std::to_chars(buf, buf + sizeof buf, v).ptr);
        return *this;
    }
    // As QString::number(v, 'g', precision) writes it ("10.5", "1.235e+04"), without its
    // locale machinery and allocation.
    TextBuilder &appendGeneral(double v, int precision)
    {
        char buf[40];
        appendAscii(buf, std::to_chars(buf, buf + sizeof buf, v, std::chars_format::general, precision).ptr);
        return *this;
    }
    // A weight as Weight::display() writes it (ASCII minus).
    TextBuilder &appendWeight(const Weight &w)
    {
        if (w.isExact())
            return *this << w.display();
        char buf[kApproxDisplayBuffer];
        const int len = approxDisplayText(w.value(), buf);
        appendAscii(buf, buf + len);
        return *this;
    }
    // Latin-1 text: digits and signs from std::to_chars, literal ASCII.
    void appendAscii(const char *begin, const char *end)
    {
        room(size_t(end - begin));
        for (const char *c = begin; c != end; ++c)
            m_data[m_size++] = char16_t(static_cast<unsigned char>(*c));
    }
    void reserve(qsizetype capacity) { grow(size_t(capacity)); }
    bool isEmpty() const { return m_size == 0; }
    QStringView view() const { return QStringView(m_data, qsizetype(m_size)); }
    QString toString() const { return view().toString(); }

private:
    void put(const char16_t *text, size_t n)
    {
        room(n);
        // Level names are short: a plain loop beats a call to memcpy, which wins for long texts.
        char16_t *to = m_data + m_size;
        if (n > 32) {
            std::memcpy(to, text, n * sizeof(char16_t));
        } else {
            for (size_t i = 0; i < n; ++i)
                to[i] = text[i];
        }
        m_size += n;
    }
    void room(size_t n)
    {
        if (m_size + n > m_capacity)
            grow(std::max(m_capacity * 2, m_size + n));
    }
    void grow(size_t capacity)
    {
        if (capacity <= m_capacity)
            return;
        auto bigger = std::make_unique_for_overwrite<char16_t[]>(capacity);
        std::copy(m_data, m_data + m_size, bigger.get());
        m_heap = std::move(bigger);
        m_data = m_heap.get();
        m_capacity = capacity;
    }

    // Short texts (small factors) stay in the object: no allocation.
    static constexpr size_t kInline = 384;
    char16_t m_inline[kInline];
    std::unique_ptr<char16_t[]> m_heap;
    char16_t *m_data = m_inline;
    size_t m_size = 0;
    size_t m_capacity = kInline;
};

} // namespace cb
