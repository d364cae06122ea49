// The SQL expression parser: every error path says where (character number,
// counting code points from 1) and what was expected; names, literals and
// precedence read as expr/expr.hpp documents.
#include <doctest/doctest.h>

#include <string>

#include "test_expr_support.hpp"

using namespace tamis;
using tamis::test::parse_error;
using tamis::test::value_of;

namespace {

const Schema& trees() {
  static const Schema schema = {
      {"site", Type::text, 0},     {"height", Type::decimal, 2}, {"planted", Type::date, 0},
      {"count", Type::integer, 0}, {"healthy", Type::boolean, 0}, {"End", Type::text, 0},
      {"diamètre", Type::integer, 0}, {"two words", Type::text, 0}, {"say \"hi\"", Type::text, 0}};
  return schema;
}

std::string error_in_trees(const std::string& text) { return parse_error(text, trees()); }

}  // namespace

TEST_CASE("unit_expr parser: the example of the brief, expected THEN found ELSE") {
  CHECK(error_in_trees("CASE WHEN TRUE ELSE 1 END") == "at character 16: expected THEN, found 'ELSE'");
  CHECK(error_in_trees("CASE WHEN count > 1 ELSE 1 END") == "at character 21: expected THEN, found 'ELSE'");
}

TEST_CASE("unit_expr parser: lexical errors") {
  CHECK(parse_error("") == "at character 1: expected an expression, found nothing");
  CHECK(parse_error("   ") == "at character 1: expected an expression, found nothing");
  CHECK(parse_error("'abc") == "at character 1: the text literal starting here has no closing quote (')");
  CHECK(parse_error("1 + \"abc") ==
        "at character 5: the quoted column name starting here has no closing quote (\")");
  CHECK(parse_error("\"\" = 1") == "at character 1: a quoted column name cannot be empty");
  CHECK(parse_error("1 -- comment") == "at character 3: comments are not allowed in expressions");
  CHECK(parse_error("1 /* c */") == "at character 3: comments are not allowed in expressions");
  CHECK(parse_error("1.5E3").starts_with("at character 1: exponent notation is not supported"));
  CHECK(parse_error("12abc") == "at character 3: expected an operator or a space after the number, found 'abc'");
  CHECK(parse_error("1 # 2") == "at character 3: unexpected character '#'");
  CHECK(parse_error("1 ! 2") ==
        "at character 3: unexpected character '!' (write <> or != for 'not equal', NOT to negate)");
  CHECK(parse_error("'a' | 'b'") == "at character 5: unexpected character '|' (|| joins texts)");
  CHECK(parse_error("7 % 2") == "at character 3: unexpected character '%' (there is no remainder operator)");
  CHECK(parse_error("1;") == "at character 2: unexpected character ';' (an expression is not a statement)");
  CHECK(parse_error("'é' || \x80") == "at character 8: the expression is not valid UTF-8");
  // Positions count characters, not bytes: 'ééé' is 5 characters, 8 bytes.
  CHECK(parse_error("'ééé' # 1") == "at character 7: unexpected character '#'");
}

TEST_CASE("unit_expr parser: values expected") {
  CHECK(parse_error("1 +") == "at character 4: expected a value, found the end of the expression");
  CHECK(parse_error("(1 + 2") == "at character 7: expected ')', found the end of the expression");
  CHECK(parse_error("1 + )") == "at character 5: expected a value, found ')'");
  CHECK(parse_error("1 2") == "at character 3: expected an operator or the end of the expression, found '2'");
  CHECK(parse_error("TRUE AND") == "at character 9: expected a value, found the end of the expression");
  CHECK(parse_error("NOT") == "at character 4: expected a value, found the end of the expression");
  CHECK(error_in_trees("End = 'x'") == "at character 1: expected a value (write \"End\" for the column of that name), "
                                       "found 'End'");
  CHECK(error_in_trees("WHEN = 'x'") == "at character 1: expected a value, found 'WHEN'");
  CHECK(parse_error("1 < 2 < 3") == "at character 7: comparisons cannot be chained; write a < b AND b < c");
  CHECK(parse_error("1 IS 2") == "at character 6: expected NULL, TRUE, FALSE or UNKNOWN, found '2'");
  CHECK(parse_error("1 BETWEEN 0 OR 2") == "at character 13: expected AND, found 'OR'");
  CHECK(parse_error("1 IN 1, 2") == "at character 6: expected '(', found '1'");
  CHECK(parse_error("1 IN (1, 2") == "at character 11: expected ')', found the end of the expression");
  CHECK(parse_error("1 IN ()") == "at character 7: expected a value, found ')'");
}

TEST_CASE("unit_expr parser: column names") {
  CHECK(error_in_trees("sit = 'x'") ==
        "at character 1: unknown column 'sit' (the columns are: site, height, planted, count, healthy, End, "
        "diamètre, two words, say \"hi\")");
  CHECK(error_in_trees("Site = 'x'") ==
        "at character 1: unknown column 'Site'; did you mean 'site'? Names are case-sensitive");
  CHECK(parse_error("x = 1") == "at character 1: unknown column 'x' (the table has no columns)");
  Schema many;
  for (int i = 0; i < 35; ++i) {
    std::string name = "c";  // appended: GCC 12's -Wrestrict misfires on "c" + std::to_string(i)
    name += std::to_string(i);
    many.push_back({name, Type::text, 0});
  }
  const std::string listing = parse_error("zz IS NULL", many);
  CHECK(listing.find("c29 and 5 more)") != std::string::npos);
  CHECK(listing.find("c30") == std::string::npos);
  // Plain names may be non-ASCII letters; quoted names may hold anything, "" is a quote.
  CHECK(error_in_trees("diamètre > 3") == "");
  CHECK(error_in_trees("\"two words\" = 'x'") == "");
  CHECK(error_in_trees("\"say \"\"hi\"\"\" = 'x'") == "");
  CHECK(error_in_trees("\"End\" = 'x'") == "");
  // DATE is a column name unless a text literal follows.
  CHECK(parse_error("date IS NULL", {{"date", Type::text, 0}}) == "");
}

TEST_CASE("unit_expr parser: literals") {
  CHECK(parse_error("9223372036854775808") ==
        "at character 1: the number 9223372036854775808 is out of range (64-bit integer)");
  CHECK(parse_error("0.1234567890123456789").starts_with(
      "at character 1: a decimal literal can have at most 18 digits after the point"));
  CHECK(parse_error("DATE '2023-02-30'") == "at character 6: '2023-02-30' is not a real date in the form 'YYYY-MM-DD'");
  CHECK(parse_error("DATE '23-02-03'") == "at character 6: '23-02-03' is not a real date in the form 'YYYY-MM-DD'");
  CHECK(value_of("'it''s'") == "it's");
  CHECK(value_of("9223372036854775807") == "9223372036854775807");
  CHECK(value_of("-9223372036854775807") == "-9223372036854775807");
  CHECK(value_of(".5") == "0.5");
  CHECK(value_of("5.") == "5");
  CHECK(value_of("DATE '2024-3-9'") == "2024-03-09");
  CHECK(value_of("true") == "true");
  CHECK(value_of("null") == "NULL");
}

TEST_CASE("unit_expr parser: types are checked where the operator is") {
  CHECK(error_in_trees("site + 1") ==
        "at character 1: '+' needs a number, found text (CAST it to INTEGER or DECIMAL(p,s))");
  CHECK(error_in_trees("1 * planted") == "at character 5: '*' needs a number, found date");
  CHECK(error_in_trees("-site") == "at character 2: unary '-' needs a number, found text (CAST it to INTEGER or "
                                   "DECIMAL(p,s))");
  CHECK(error_in_trees("count || 'x'") == "at character 1: || (joining texts) needs text, found integer");
  CHECK(error_in_trees("count AND healthy") == "at character 1: AND needs boolean, found integer");
  CHECK(error_in_trees("healthy OR site") == "at character 12: OR needs boolean, found text");
  CHECK(error_in_trees("NOT site") == "at character 5: NOT needs boolean, found text");
  CHECK(error_in_trees("site = 1") == "at character 6: cannot compare text with integer; CAST one side to the type "
                                      "of the other");
  CHECK(error_in_trees("planted > 3") == "at character 9: cannot compare date with integer; CAST one side to the "
                                         "type of the other");
  CHECK(error_in_trees("planted > 'soon'") == "at character 11: 'soon' is not a date (expected 'YYYY-MM-DD')");
  CHECK(error_in_trees("count BETWEEN 'a' AND 'z'") ==
        "at character 7: cannot compare integer with text; CAST one side to the type of the other");
  CHECK(error_in_trees("site IN ('a', 2)") ==
        "at character 6: cannot compare text with integer; CAST one side to the type of the other");
  CHECK(error_in_trees("count LIKE 'a%'") == "at character 1: LIKE needs text, found integer");
  CHECK(error_in_trees("site LIKE 5") == "at character 11: a LIKE pattern needs text, found integer");
  CHECK(error_in_trees("site LIKE 'a' ESCAPE 1") == "at character 22: ESCAPE needs text, found integer");
  CHECK(error_in_trees("healthy IS TRUE IS UNKNOWN") == "");
  CHECK(error_in_trees("count IS TRUE") == "at character 1: IS TRUE needs boolean, found integer");
  CHECK(error_in_trees("UPPER(count)") == "at character 7: UPPER needs text, found integer");
  CHECK(error_in_trees("ABS(site)") == "at character 5: ABS needs a number, found text (CAST it to INTEGER or "
                                       "DECIMAL(p,s))");
  CHECK(error_in_trees("CHAR_LENGTH(planted)") == "at character 13: CHAR_LENGTH needs text, found date");
  CHECK(error_in_trees("SUBSTRING(site FROM 1.5)") == "at character 21: SUBSTRING's start needs integer, found "
                                                      "decimal (scale 1)");
  CHECK(error_in_trees("SUBSTRING(site, 1, 'x')") == "at character 20: SUBSTRING's length needs integer, found text");
  CHECK(error_in_trees("TRIM(count)") == "at character 6: TRIM needs text, found integer");
  CHECK(error_in_trees("TRIM(1 FROM site)") == "at character 6: TRIM's characters needs text, found integer");
  CHECK(error_in_trees("CASE WHEN count THEN 1 END") == "at character 11: WHEN needs boolean, found integer");
  CHECK(error_in_trees("CASE WHEN healthy THEN 1 ELSE 'x' END") ==
        "at character 31: the results of CASE must all have one type: this is text, an earlier one is integer");
  CHECK(error_in_trees("CASE site WHEN 1 THEN 1 END") ==
        "at character 11: cannot compare text with integer; CAST one side to the type of the other");
  CHECK(error_in_trees("COALESCE(site, count)") ==
        "at character 16: the arguments of COALESCE must all have one type: this is integer, an earlier one is text");
  CHECK(error_in_trees("NULLIF(site, 1)") ==
        "at character 1: cannot compare text with integer; CAST one side to the type of the other");
  CHECK(parse_error("1 + 1", {}, Expression::Use::condition) ==
        "at character 1: expected a condition (true or false), found integer expression");
  CHECK(parse_error("NULL", {}, Expression::Use::condition) == "");
}

TEST_CASE("unit_expr parser: CASE, CAST and function syntax") {
  CHECK(parse_error("CASE END") == "at character 6: expected WHEN, found 'END'");
  CHECK(parse_error("CASE WHEN TRUE THEN 1") == "at character 22: expected END, found the end of the expression");
  CHECK(parse_error("CAST(1 INTEGER)") == "at character 8: expected AS, found 'INTEGER'");
  CHECK(parse_error("CAST 1") == "at character 6: expected '(', found '1'");
  CHECK(parse_error("CAST(1 AS FLOAT)") == "at character 11: expected a type (TEXT, VARCHAR, INTEGER, BIGINT, "
                                           "DECIMAL(p,s), NUMERIC(p,s), DATE or BOOLEAN), found 'FLOAT'");
  CHECK(parse_error("CAST(1 AS 5)") == "at character 11: expected a type name, found '5'");
  CHECK(parse_error("CAST('a' AS VARCHAR(10))") ==
        "at character 20: a length is not supported here: VARCHAR values have no length limit");
  CHECK(parse_error("CAST('1' AS DECIMAL)") == "at character 20: expected (precision, scale) after DECIMAL, found "
                                               "')': the scale must be known, e.g. DECIMAL(12,2)");
  CHECK(parse_error("CAST('1' AS NUMERIC(19,2))") == "at character 21: a precision from 1 to 18 is needed, found 19");
  CHECK(parse_error("CAST('1' AS NUMERIC(4,5))") == "at character 23: a scale from 0 to 4 is needed, found 5");
  CHECK(parse_error("CAST('1' AS NUMERIC(x))") == "at character 21: expected a precision, found 'x'");
  CHECK(parse_error("CAST('1' AS NUMERIC(4,2)") == "at character 25: expected ')', found the end of the expression");
  CHECK(error_in_trees("CAST(planted AS INTEGER)") == "at character 6: cannot CAST date to integer");
  CHECK(error_in_trees("CAST(healthy AS DECIMAL(3,1))") == "at character 6: cannot CAST boolean to decimal (scale 1)");
  CHECK(error_in_trees("CAST(count AS DATE)") == "at character 6: cannot CAST integer to date");
  CHECK(parse_error("FOO(1)") == "at character 1: unknown function 'FOO' (the functions are ABS, CAST, CHAR_LENGTH, "
                                 "COALESCE, LOWER, NULLIF, ROUND, SUBSTRING, TRIM, UPPER)");
  CHECK(parse_error("UPPER('a', 'b')") == "at character 1: UPPER takes one argument, found 2");
  CHECK(parse_error("ABS()") == "at character 1: ABS takes one argument, found 0");
  CHECK(parse_error("COALESCE()") == "at character 1: COALESCE takes at least one argument, found 0");
  CHECK(parse_error("NULLIF(1)") == "at character 1: NULLIF takes two arguments, found 1");
  CHECK(parse_error("ROUND(1, 2, 3)") == "at character 1: ROUND takes one or two arguments, found 3");
  CHECK(parse_error("ROUND(1.55, 1 + 1)") == "at character 13: ROUND's digits must be an integer literal from -18 "
                                             "to 18");
  CHECK(parse_error("ROUND(1.55, 19)") == "at character 13: ROUND's digits must be an integer literal from -18 to 18");
  CHECK(parse_error("UPPER('a'") == "at character 10: expected ')', found the end of the expression");
  CHECK(parse_error("SUBSTRING('abc' 1)") == "at character 17: expected FROM or ',', found '1'");
  CHECK(parse_error("SUBSTRING('abc', 1, 2, 3)") == "at character 24: SUBSTRING takes a value, a start and a length");
  CHECK(parse_error("SUBSTRING('abc' ,)") == "at character 18: expected SUBSTRING's start, found ')'");
  // Found by the expression fuzzer: deep nesting overflowed the stack.
  const std::string too_deep = "the expression nests too deeply (more than 100 levels); split it into several steps";
  CHECK(parse_error(std::string(5000, '(') + "1") == "at character 101: " + too_deep);
  std::string negations;
  for (int i = 0; i < 3000; ++i) negations += "NOT ";
  CHECK(parse_error(negations + "TRUE").find(too_deep) != std::string::npos);
  std::string signs;  // "- " each: "--" would start a comment
  for (int i = 0; i < 3000; ++i) signs += "- ";
  CHECK(parse_error(signs + "1").find(too_deep) != std::string::npos);
  std::string chain = "1";
  for (int i = 0; i < 2000; ++i) chain += " + 1";
  CHECK(parse_error(chain).find(too_deep) != std::string::npos);
  std::string fine = "1";
  for (int i = 0; i < 90; ++i) fine += " + 1";
  CHECK(parse_error(std::string(90, '(') + fine + std::string(90, ')')) == "");
  CHECK(parse_error("TRIM(LEADING 'x')") == "at character 17: expected FROM, found ')'");
  CHECK(parse_error("TRIM('x' FROM 'y'") == "at character 18: expected ')', found the end of the expression");
  CHECK(parse_error("'a' LIKE 'b' ESCAPE 'xy'") == "at character 21: ESCAPE needs exactly one character, found 'xy'");
  CHECK(parse_error("'a' LIKE 'b!' ESCAPE '!'") ==
        "at character 10: invalid LIKE pattern: the pattern ends with the escape character");
  CHECK(parse_error("'a' LIKE '!b' ESCAPE '!'") ==
        "at character 10: invalid LIKE pattern: the escape character must be followed by '%', '_' or itself, "
        "found 'b'");
}

// Operator precedence as in ISO/IEC 9075-2 (<boolean value expression>:
// OR < AND < NOT < IS < predicates; <numeric value expression>: + - below
// * /, unary sign highest) — from memory of the standard's grammar.
TEST_CASE("unit_expr parser: precedence") {
  CHECK(value_of("1 + 2 * 3") == "7");
  CHECK(value_of("(1 + 2) * 3") == "9");
  CHECK(value_of("10 - 4 - 3") == "3");
  CHECK(value_of("-2 * 3") == "-6");
  CHECK(value_of("- (2 - 5)") == "3");
  CHECK(value_of("2 - -3") == "5");
  CHECK(value_of("TRUE OR TRUE AND FALSE") == "true");    // AND binds tighter than OR
  CHECK(value_of("(TRUE OR TRUE) AND FALSE") == "false");
  CHECK(value_of("NOT FALSE AND FALSE") == "false");      // NOT binds tighter than AND
  CHECK(value_of("NOT 1 = 2") == "true");                 // comparison binds tighter than NOT
  CHECK(value_of("'a' || 'b' = 'ab'") == "true");         // || binds tighter than =
  CHECK(value_of("'n' || 1 + 2 IS NULL") == "error: at character 8: || (joining texts) needs text, found integer");
  CHECK(value_of("1 = 1 IS TRUE") == "true");
  CHECK(value_of("NULL IS NULL IS TRUE") == "true");
  CHECK(value_of("2 BETWEEN 1 AND 3 AND FALSE") == "false");
  CHECK(value_of("NOT 2 NOT BETWEEN 1 AND 3") == "true");
  CHECK(value_of("CaSe WhEn tRuE tHeN 'k' eNd") == "k");  // keywords in any case
}
