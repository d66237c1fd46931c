#pragma once
// One exception hierarchy for everything stepcert rejects or cannot do.
// Every message says what was wrong and what to do about it.
#include <stdexcept>
#include <string>

namespace stepcert {

/// Base of every exception stepcert throws.
class error : public std::runtime_error {
public:
    using std::runtime_error::runtime_error;
};

/// An argument is out of its domain (empty interval, h <= 0, ratio <= 1, ...).
class invalid_input : public error {
public:
    using error::error;
};

/// A state, a time or a right-hand-side value is NaN or infinite.
class non_finite_value : public error {
public:
    using error::error;
};

/// A loop hit its evaluation or step budget before finishing.
class budget_exhausted : public error {
public:
    using error::error;
};

/// The requested accuracy cannot be reached (reference digits, tolerance below round-off).
class accuracy_unreachable : public error {
public:
    using error::error;
};

/// A problem or method lacks something the requested operation needs.
class unsupported_operation : public error {
public:
    using error::error;
};

} // namespace stepcert
