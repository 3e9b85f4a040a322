#pragma once

#include <QString>

#include <optional>
#include <utility>

namespace cb {

// What went wrong: a message for people that names the place and what was expected, and, when
// the problem belongs to one input, that input's key ("sd", "means") so that a form marks the
// right field without reading the message. An empty message means no problem.
struct Problem
{
    QString message;
    QString field;

    bool isEmpty() const { return message.isEmpty(); }
};

// A value or a message saying what went wrong and where (with the field, when there is one).
// Core functions return this instead of throwing across module boundaries.
template <typename T>
class Result
{
public:
    Result(T value) : m_value(std::move(value)) {}
    static Result failure(QString message, QString field = {})
    {
        Result r;
        r.m_error = std::move(message);
        r.m_field = std::move(field);
        return r;
    }
    static Result failure(Problem problem) { return failure(std::move(problem.message), std::move(problem.field)); }

    bool ok() const { return m_value.has_value(); }
    explicit operator bool() const { return ok(); }
    const T &value() const { return *m_value; }
    T &value() { return *m_value; }
    T take() { return std::move(*m_value); }
    const T *operator->() const { return &*m_value; }
    T *operator->() { return &*m_value; }
    const T &operator*() const { return *m_value; }
    const QString &error() const { return m_error; }
    // The input the error belongs to; empty when it is not one input's.
    const QString &field() const { return m_field; }
    Problem problem() const { return Problem{m_error, m_field}; }

private:
    Result() = default;
    std::optional<T> m_value;
    QString m_error;
    QString m_field;
};

} // namespace cb
