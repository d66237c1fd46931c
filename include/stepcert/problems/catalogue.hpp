#pragma once
// The whole catalogue of test problems (namespace stepcert::problems).
// With exact solutions: dahlquist, linear_system, harmonic_oscillator, kepler, prothero_robinson,
// busbar_cooling (a method-of-lines system of any size; exact for the semi-discrete system).
// With a known value at one time: arenstorf_orbit (returns to its start after one period).
// Scenarios of our own without closed form: suspension_rig, small_satellite.
#include "stepcert/problems/arenstorf.hpp"
#include "stepcert/problems/busbar_cooling.hpp"
#include "stepcert/problems/dahlquist.hpp"
#include "stepcert/problems/harmonic_oscillator.hpp"
#include "stepcert/problems/kepler.hpp"
#include "stepcert/problems/linear_system.hpp"
#include "stepcert/problems/prothero_robinson.hpp"
#include "stepcert/problems/small_satellite.hpp"
#include "stepcert/problems/stiff_reactor.hpp"
#include "stepcert/problems/suspension_rig.hpp"
