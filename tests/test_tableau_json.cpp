// Tableau files: exact round trips of the catalogue in cpp_rational, double and
// cpp_bin_float_50, a hand-written file, and one test per class of malformed input: each must
// throw stepcert::invalid_input naming the field (tests/fuzz/ fuzzes the same reader).
#include <sstream>
#include <string>
#include <vector>

#include <gtest/gtest.h>

#include <boost/multiprecision/cpp_bin_float.hpp>
#include <boost/multiprecision/cpp_int.hpp>

#include "stepcert/tableau/catalogue.hpp"
#include "stepcert/tableau/order_conditions.hpp"
#include "stepcert/tableau/tableau_json.hpp"

namespace {
using boost::multiprecision::cpp_rational;
using mp50 = boost::multiprecision::cpp_bin_float_50;
namespace tb = stepcert::tableaus;

template <class T>
std::vector<stepcert::tableau<T>> some_tableaus() {
    return {tb::explicit_euler<T>(), tb::classic_rk4<T>(), tb::bogacki_shampine32<T>(), tb::fehlberg45<T>(),
            tb::cash_karp54<T>(),    tb::dormand_prince54<T>(), tb::implicit_midpoint<T>()};
}

template <class T>
void expect_same(const stepcert::tableau<T>& a, const stepcert::tableau<T>& b) {
    EXPECT_EQ(a.name, b.name);
    EXPECT_EQ(a.claimed_order, b.claimed_order);
    EXPECT_EQ(a.a, b.a) << a.name;  // exact equality, also for floating types
    EXPECT_EQ(a.b, b.b) << a.name;
    EXPECT_EQ(a.c, b.c) << a.name;
    EXPECT_EQ(a.b_embedded, b.b_embedded) << a.name;
    EXPECT_EQ(a.claimed_embedded_order, b.claimed_embedded_order);
}

template <class T>
class TableauFileRoundTrip : public ::testing::Test {};
using Scalars = ::testing::Types<cpp_rational, double, mp50>;
TYPED_TEST_SUITE(TableauFileRoundTrip, Scalars);

TYPED_TEST(TableauFileRoundTrip, WrittenAndReadBackExactly) {
    for (const auto& t : some_tableaus<TypeParam>()) {
        const std::string text = stepcert::tableau_to_json(t).dump(1);
        expect_same(stepcert::parse_tableau_json<TypeParam>(text), t);
    }
}

TEST(TableauFile, HandWrittenFileWithShortRowsAndIntegers) {
    // Kutta's third-order method (W. Kutta 1901; from memory), explicit rows left of the diagonal only.
    const char* text = R"({"format": "stepcert.tableau", "format_version": 1, "name": "our RK3", "order": 3,
        "a": [[], ["1/2"], [-1, 2]], "b": ["1/6", "2/3", "1/6"], "c": [0, "0.5", 1]})";
    std::istringstream in(text);
    const auto t = stepcert::read_tableau_json<cpp_rational>(in);
    expect_same(t, [] {
        auto k = tb::kutta3<cpp_rational>();
        k.name = "our RK3";
        return k;
    }());
    EXPECT_EQ(stepcert::check_order_conditions(t).main.algebraic_order, 3);
}

// The message must name where the problem is.
void expect_rejected(const std::string& text, const std::string& where) {
    try {
        (void)stepcert::parse_tableau_json<cpp_rational>(text);
        ADD_FAILURE() << "accepted: " << text;
    } catch (const stepcert::invalid_input& e) {
        EXPECT_NE(std::string(e.what()).find(where), std::string::npos) << "message '" << e.what() << "' does not name " << where;
    }
}

std::string doc(const std::string& a, const std::string& b, const std::string& c, const std::string& extra = "") {
    return R"({"format": "stepcert.tableau", "format_version": 1, "name": "x", "order": 2, "a": )" + a + R"(, "b": )" + b +
           R"(, "c": )" + c + extra + "}";
}

TEST(TableauFileMalformed, NotJsonOrNotOurs) {
    expect_rejected("{\"format\": ", "not valid JSON");
    expect_rejected("[1, 2]", "expected a JSON object");
    expect_rejected(R"({"format": "other", "format_version": 1})", "format");
    expect_rejected(R"({"format": "stepcert.tableau", "format_version": 99, "name": "x", "order": 1, "a": [[0]], "b": [1], "c": [0]})",
                    "format_version");
    expect_rejected(doc(R"([[], ["1"]])", R"(["1/2", "1/2"])", R"([0, 1])", R"(, "colour": "red")"), "unknown field \"colour\"");
}

TEST(TableauFileMalformed, MissingFields) {
    expect_rejected(R"({"format": "stepcert.tableau", "format_version": 1, "order": 1, "a": [[0]], "b": [1], "c": [0]})", "\"name\"");
    expect_rejected(R"({"format": "stepcert.tableau", "format_version": 1, "name": "x", "a": [[0]], "b": [1], "c": [0]})", "\"order\"");
    expect_rejected(R"({"format": "stepcert.tableau", "format_version": 1, "name": "x", "order": 1, "b": [1], "c": [0]})", "\"a\"");
    expect_rejected(R"({"format": "stepcert.tableau", "format_version": 1, "name": "x", "order": 1, "a": [[0]], "c": [0]})", "\"b\"");
    expect_rejected(R"({"format": "stepcert.tableau", "format_version": 1, "name": "x", "order": 1, "a": [[0]], "b": [1]})", "\"c\"");
    expect_rejected(doc(R"([[], ["1"]])", R"(["1/2", "1/2"])", R"([0, 1])", R"(, "embedded": {"b": [1, 0]})"), "\"order\"");
}

TEST(TableauFileMalformed, WrongSizes) {
    expect_rejected(doc(R"([[], ["1"]])", R"(["1/2", "1/2"])", R"([0])"), "c");
    expect_rejected(doc(R"([[]])", R"(["1/2", "1/2"])", R"([0, 1])"), "a");
    expect_rejected(doc(R"([[], ["1", "2", "3"]])", R"(["1/2", "1/2"])", R"([0, 1])"), "a[1]");
    expect_rejected(doc(R"([[], ["1"]])", R"([])", R"([])"), "b");
    expect_rejected(doc(R"([[], ["1"]])", R"(["1/2", "1/2"])", R"([0, 1])", R"(, "embedded": {"b": [1], "order": 1})"), "embedded.b");
}

TEST(TableauFileMalformed, NonNumericEntries) {
    expect_rejected(doc(R"([[], ["abc"]])", R"(["1/2", "1/2"])", R"([0, 1])"), "a[1][0]");
    expect_rejected(doc(R"([[], [true]])", R"(["1/2", "1/2"])", R"([0, 1])"), "a[1][0]");
    expect_rejected(doc(R"([[], ["1"]])", R"([null, "1/2"])", R"([0, 1])"), "b[0]");
    expect_rejected(doc(R"([[], ["1"]])", R"(["1/2", {}])", R"([0, 1])"), "b[1]");
    expect_rejected(doc(R"([[], ["1"]])", R"(["1/2", "1/2"])", R"([0, 0.5])"), "c[1]");  // a rounded JSON number
    expect_rejected(R"({"format": "stepcert.tableau", "format_version": 1, "name": "x", "order": "2", "a": [[0]], "b": [1], "c": [0]})", "order");
}

TEST(TableauFileMalformed, DivisionByZeroAndNonFinite) {
    expect_rejected(doc(R"([[], ["1/0"]])", R"(["1/2", "1/2"])", R"([0, 1])"), "a[1][0]");
    expect_rejected(doc(R"([[], ["1"]])", R"(["nan", "1/2"])", R"([0, 1])"), "b[0]");
    expect_rejected(doc(R"([[], ["1"]])", R"(["inf", "1/2"])", R"([0, 1])"), "b[0]");
    // A number beyond double: nlohmann_json refuses it while parsing, naming the literal.
    expect_rejected(doc(R"([[], ["1"]])", R"(["1/2", "1/2"])", R"([0, 1e400])"), "1e400");
}

} // namespace
