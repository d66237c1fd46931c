#pragma once
// Makes odeint usable with states of Boost.Multiprecision numbers (Boost 1.81).
// number<>::value_type is number<> itself, so odeint's extract_value_type, which follows
// value_type until there is none, recurses into an incomplete type and adaptive steppers
// fail to compile. Declaring the global has_value_type trait false for number<> stops the
// recursion at the number. Specializing extract_value_type directly is ambiguous.
// Include this header before any odeint header that instantiates a stepper (stepcert's own
// headers do). It is the only place in stepcert that touches odeint's internals.
#include <boost/mpl/bool.hpp>
#include <boost/multiprecision/number.hpp>
#include <boost/numeric/odeint/algebra/detail/extract_value_type.hpp>

template <class Backend, boost::multiprecision::expression_template_option ET>
struct has_value_type<boost::multiprecision::number<Backend, ET>, boost::mpl::bool_<false>> : boost::mpl::false_ {};
