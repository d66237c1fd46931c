#pragma once
// Umbrella header: the core of stepcert (needs Boost only). Optional integrations
// (report/json.hpp needs nlohmann_json, testing/gtest.hpp needs GoogleTest) are included separately.
#include "stepcert/core/concepts.hpp"
#include "stepcert/core/error.hpp"
#include "stepcert/core/norm.hpp"
#include "stepcert/core/problem.hpp"
#include "stepcert/core/state.hpp"
#include "stepcert/methods/classic_rk4.hpp"
#include "stepcert/methods/method.hpp"
#include "stepcert/run/run.hpp"
#include "stepcert/problems/catalogue.hpp"
#include "stepcert/study/ladder.hpp"
#include "stepcert/study/order_study.hpp"
#include "stepcert/report/study_table.hpp"
#include "stepcert/report/csv.hpp"
