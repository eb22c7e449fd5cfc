/* Exact decimal millimetres to nanometres (DESIGN.md §3: no floating
 * point, 6 decimals at most, every value exact). */
#include <stdarg.h>
#include <stddef.h>
#include <setjmp.h>
#include <stdint.h>
#include <cmocka.h>

#include "units.h"

#include <locale.h>
#include <string.h>

static void assert_mm(const char *text, int64_t expected)
{
	int64_t nm = 0;
	const char *why = NULL;
	if (!gp_parse_mm(text, &nm, &why))
		fail_msg("'%s' rejected: %s", text, why);
	assert_int_equal(nm, expected);
}

static void assert_rejected(const char *text, const char *why_part)
{
	int64_t nm = 12345;
	const char *why = NULL;
	assert_false(gp_parse_mm(text, &nm, &why));
	assert_int_equal(nm, 12345); /* untouched */
	assert_non_null(why);
	if (!strstr(why, why_part))
		fail_msg("'%s': reason '%s' lacks '%s'", text, why, why_part);
}

static void plain_values(void **state)
{
	(void)state;
	assert_mm("0", 0);
	assert_mm("1", 1000000);
	assert_mm("2.54", 2540000);
	assert_mm("0.000001", 1);
	assert_mm("4.123457", 4123457);
	assert_mm("9999.999999", INT64_C(9999999999));
	assert_mm("10000", INT64_C(10000000000));
}

static void zeros_and_signs(void **state)
{
	(void)state;
	assert_mm("007.500", 7500000);   /* leading and trailing zeros */
	assert_mm("0.100000", 100000);
	assert_mm(".5", 500000);
	assert_mm("5.", 5000000);
	assert_mm("+3.25", 3250000);
	assert_mm("-3.25", -3250000);
	assert_mm("-0", 0);
	assert_mm("-0.000001", -1);
}

static void rejected_forms(void **state)
{
	(void)state;
	assert_rejected("1e3", "exponent");
	assert_rejected("2.5E-1", "exponent");
	assert_rejected("1.0000001", "more than 6 decimals");
	assert_rejected("0.1234567", "more than 6 decimals");
	assert_rejected("", "not a length");
	assert_rejected(".", "not a length");
	assert_rejected("-", "not a length");
	assert_rejected("1,5", "not a length");
	assert_rejected(" 1", "not a length");
	assert_rejected("1 ", "not a length");
	assert_rejected("0x10", "not a length");
	assert_rejected("inf", "not a length");
	assert_rejected("nan", "not a length");
	assert_rejected("1mm", "not a length");
	assert_rejected("--1", "not a length");
}

static void overflow(void **state)
{
	(void)state;
	assert_rejected("10000.000001", "too large");
	assert_rejected("99999999999999999999999", "too large");
	assert_rejected("-92233720368547758080", "too large");
}

static void formatting(void **state)
{
	(void)state;
	char text[40];
	gp_format_mm(text, sizeof(text), 2540000);
	assert_string_equal(text, "2.540000");
	gp_format_mm(text, sizeof(text), -1);
	assert_string_equal(text, "-0.000001");
	gp_format_mm(text, sizeof(text), INT64_MIN);
	assert_string_equal(text, "-9223372036854.775808");
	gp_format_mm_short(text, sizeof(text), 2540000);
	assert_string_equal(text, "2.54");
	gp_format_mm_short(text, sizeof(text), 3000000);
	assert_string_equal(text, "3");
}

static void round_trip(void **state)
{
	(void)state;
	/* every formatted value parses back to itself */
	for (int64_t nm = -2000003; nm <= 2000003; nm += 99991) {
		char text[40];
		int64_t back;
		const char *why;
		gp_format_mm(text, sizeof(text), nm);
		assert_true(gp_parse_mm(text, &back, &why));
		assert_int_equal(back, nm);
	}
}

static void checked_arithmetic(void **state)
{
	(void)state;
	int64_t out;
	assert_true(gp_mul_nm(GP_LENGTH_MAX, 1000, &out));
	assert_false(gp_mul_nm(INT64_MAX / 2, 3, &out));
	assert_false(gp_add_nm(INT64_MAX, 1, &out));
	assert_true(gp_add_nm(-5, 5, &out));
	assert_int_equal(out, 0);
}

/* --- other numbers: one grammar (gp_parse_decimal) ------------------------ */

static void assert_decimal(const char *text, double expected)
{
	double value = -1;
	if (!gp_parse_decimal(text, &value))
		fail_msg("'%s' rejected", text);
	/* the values below are exact in binary or are compared with the
	 * nearest double, as ISO C's strtod in the C locale gives it */
	assert_true(value == expected);
}

static void assert_not_decimal(const char *text)
{
	double value = 42;
	if (gp_parse_decimal(text, &value))
		fail_msg("'%s' accepted as %g", text, value);
	assert_true(value == 42); /* untouched */
}

static void decimals_as_people_write_them(void **state)
{
	(void)state;
	assert_decimal("0", 0);
	assert_decimal("2.5", 2.5);
	assert_decimal("-0.25", -0.25);
	assert_decimal("+3", 3);
	assert_decimal(".5", 0.5);
	assert_decimal("5.", 5);
	assert_decimal("0.1", 0.1);
	assert_decimal("1000000", 1e6);
}

static void no_hex_no_exponent(void **state)
{
	(void)state;
	/* forms strtod takes (ISO C 7.22.1.3) that a description may not use */
	assert_not_decimal("0x0.1p0");
	assert_not_decimal("0x7");
	assert_not_decimal("5e-2");
	assert_not_decimal("1E3");
	assert_not_decimal("inf");
	assert_not_decimal("nan");
	assert_not_decimal(" 1");
	assert_not_decimal("1 ");
	assert_not_decimal("");
	assert_not_decimal("+");
	assert_not_decimal(".");
	assert_not_decimal("-.");
	assert_not_decimal("1.2.3");
	assert_not_decimal("1,5");
	assert_not_decimal("--1");
}

/* Under a locale that writes a decimal comma, '.' still is the point. */
static void independent_of_the_locale(void **state)
{
	(void)state;
	const char *names[] = { "de_DE.UTF-8", "de_DE.utf8", "fr_FR.UTF-8",
				"nl_NL.UTF-8" };
	const char *found = NULL;
	for (size_t i = 0; !found && i < sizeof(names) / sizeof(names[0]); i++)
		if (setlocale(LC_NUMERIC, names[i]))
			found = names[i];
	if (!found)
		skip();
	assert_decimal("2.5", 2.5);
	assert_not_decimal("2,5");
	setlocale(LC_NUMERIC, "C");
}

int main(void)
{
	const struct CMUnitTest tests[] = {
		cmocka_unit_test(plain_values),
		cmocka_unit_test(zeros_and_signs),
		cmocka_unit_test(rejected_forms),
		cmocka_unit_test(overflow),
		cmocka_unit_test(formatting),
		cmocka_unit_test(round_trip),
		cmocka_unit_test(checked_arithmetic),
		cmocka_unit_test(decimals_as_people_write_them),
		cmocka_unit_test(no_hex_no_exponent),
		cmocka_unit_test(independent_of_the_locale),
	};
	return cmocka_run_group_tests(tests, NULL, NULL);
}
