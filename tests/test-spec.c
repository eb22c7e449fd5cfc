/* The description loader: positions, messages, overrides, limits. */
#include <stdarg.h>
#include <stddef.h>
#include <setjmp.h>
#include <stdint.h>
#include <cmocka.h>

#include "model.h"
#include "spec.h"

#include <stdio.h>
#include <stdlib.h>
#include <string.h>

static const char base[] =
	"glass:\n"
	"  part: TEST-1\n"
	"front:\n"
	"  size: [40, 30]\n"
	"back:\n"
	"  size: [40, 25]\n"
	"  position: [0, 5]\n"
	"viewing_area:\n"
	"  position: [2, 7]\n"
	"  size: [36, 20]\n"
	"blocks:\n"
	"  main:\n"
	"    origin: [5, 25]\n"
	"    cells: [4, 2]\n"
	"    dots: [5, 7]\n"
	"    dot_size: [0.5, 0.5]\n"
	"    dot_pitch: [0.6, 0.6]\n"
	"    cell_pitch: 3.5\n"
	"    line_pitch: 5\n";

/* Loads text; returns the first message or "" and frees everything. */
static char *load_message(const char *text, const char *const *overrides,
			  size_t count)
{
	struct gp_diag diag;
	gp_diag_init(&diag);
	struct gp_design *design = gp_design_load_buffer(
		"t.yaml", text, strlen(text), overrides, count, &diag);
	char *message = strdup(diag.count ? diag.entries[0].message : "");
	if (design)
		assert_int_equal(diag.errors, 0);
	else
		assert_true(diag.errors > 0);
	gp_design_destroy(design);
	gp_diag_finish(&diag);
	return message;
}

static void expect(const char *text, const char *expected)
{
	char *message = load_message(text, NULL, 0);
	if (strcmp(message, expected) != 0)
		fail_msg("got      '%s'\nexpected '%s'", message, expected);
	free(message);
}

static void base_loads(void **state)
{
	(void)state;
	expect(base, "");
}

static void bad_yaml(void **state)
{
	(void)state;
	expect("glass: [1, 2\n",
	       "t.yaml:2:1: bad YAML: did not find expected ',' or ']' "
	       "while parsing a flow sequence");
	expect("", "t.yaml:1:1: the description is empty; expected a map "
		   "of sections such as 'front', 'back' and 'blocks'");
	expect("- 1\n- 2\n", "t.yaml:1:1: the description must be a map of "
			     "sections (key: value), not a list");
}

static void unknown_key_suggests(void **state)
{
	(void)state;
	char text[2048];
	snprintf(text, sizeof(text), "%s    dot_sise: [1, 1]\n", base);
	expect(text, "t.yaml:20:5: unknown key 'dot_sise' in block 'main'; "
		     "did you mean 'dot_size'?");
	snprintf(text, sizeof(text), "%sflavour: 3\n", base);
	char *message = load_message(text, NULL, 0);
	assert_non_null(strstr(message, "t.yaml:20:1: unknown key 'flavour' "
					"in the description; expected one of:"));
	free(message);
}

static void duplicate_key(void **state)
{
	(void)state;
	char text[2048];
	snprintf(text, sizeof(text), "%s    cells: [1, 1]\n", base);
	expect(text, "t.yaml:20:5: duplicate key 'cells' (first given at "
		     "line 14); each key may appear once");
}

static void wrong_types(void **state)
{
	(void)state;
	char text[2048];
	snprintf(text, sizeof(text), "%s", base);
	char *p = strstr(text, "cell_pitch: 3.5");
	memcpy(p, "cell_pitch: [3]", 15);
	expect(text, "t.yaml:18:17: 'cell_pitch' must be a length in "
		     "millimetres, not a list");
	snprintf(text, sizeof(text), "%s", base);
	p = strstr(text, "cells: [4, 2]");
	memcpy(p, "cells: [4, x]", 13);
	expect(text, "t.yaml:14:16: 'cells' must be a whole number, got 'x'");
}

static void missing_and_range(void **state)
{
	(void)state;
	expect("glass:\n  part: X\n",
	       "t.yaml:1:1: missing required key 'front' in the description");
	char text[2048];
	snprintf(text, sizeof(text), "%s", base);
	char *p = strstr(text, "dot_size: [0.5, 0.5]");
	memcpy(p, "dot_size: [0.5, 0.0]", 20);
	expect(text, "t.yaml:16:21: 'dot_size' values must be greater than "
		     "zero, got 0.0");
}

static void dots_larger_than_pitch(void **state)
{
	(void)state;
	char text[2048];
	snprintf(text, sizeof(text), "%s", base);
	char *p = strstr(text, "dot_size: [0.5, 0.5]");
	memcpy(p, "dot_size: [0.7, 0.5]", 20);
	expect(text, "t.yaml:13:5: block 'main': dot width 0.7 mm is larger "
		     "than the dot pitch 0.6 mm");
}

static void too_many_decimals(void **state)
{
	(void)state;
	char text[2048];
	snprintf(text, sizeof(text), "%s", base);
	char *p = strstr(text, "line_pitch: 5\n");
	strcpy(p, "line_pitch: 5.1234567\n");
	expect(text, "t.yaml:19:17: 'line_pitch' value '5.1234567' has more "
		     "than 6 decimals (1 nm is the finest step)");
}

static void overrides(void **state)
{
	(void)state;
	const char *ok[] = { "blocks.main.cell_pitch=3.6" };
	char *message = load_message(base, ok, 1);
	assert_string_equal(message, "");
	free(message);
	const char *bad[] = { "blocks.main.cell_pitch=3.6",
			      "blocks.main.cell_pitch=-1" };
	message = load_message(base, bad, 2);
	assert_string_equal(message, "--set #2: 'cell_pitch' must be greater "
				     "than zero, got -1");
	free(message);
	const char *nowhere[] = { "blocks.side.cell_pitch=3" };
	message = load_message(base, nowhere, 1);
	assert_string_equal(message,
			    "--set #1: 'side' is not a section of the "
			    "description; expected a key path such as "
			    "blocks.main.cell_pitch");
	free(message);
	const char *new_key[] = { "blocks.main.colour=red" };
	message = load_message(base, new_key, 1);
	assert_non_null(strstr(message, "--set #1: unknown key 'colour'"));
	free(message);
}

static void override_value_applies(void **state)
{
	(void)state;
	struct gp_diag diag;
	gp_diag_init(&diag);
	const char *set[] = { "blocks.main.origin=[6, 24.5]" };
	struct gp_design *design = gp_design_load_buffer(
		"t.yaml", base, strlen(base), set, 1, &diag);
	assert_non_null(design);
	assert_int_equal(design->blocks[0].origin.x, 6000000);
	assert_int_equal(design->blocks[0].origin.y, 24500000);
	assert_int_equal(design->spec->override_count, 1);
	gp_design_destroy(design);
	gp_diag_finish(&diag);
}

static void hostile_input(void **state)
{
	(void)state;
	/* deep nesting */
	char deep[400];
	memset(deep, '[', 100);
	deep[100] = '\0';
	char *message = load_message(deep, NULL, 0);
	assert_true(strlen(message) > 0);
	free(message);
	/* alias expansion is bounded */
	const char bomb[] =
		"a: &a [x, x, x, x, x, x, x, x, x, x]\n"
		"b: &b [*a, *a, *a, *a, *a, *a, *a, *a, *a, *a]\n"
		"c: &c [*b, *b, *b, *b, *b, *b, *b, *b, *b, *b]\n"
		"d: &d [*c, *c, *c, *c, *c, *c, *c, *c, *c, *c]\n"
		"e: &e [*d, *d, *d, *d, *d, *d, *d, *d, *d, *d]\n"
		"f: &f [*e, *e, *e, *e, *e, *e, *e, *e, *e, *e]\n";
	message = load_message(bomb, NULL, 0);
	assert_non_null(strstr(message, "too large"));
	free(message);
	/* NUL inside the text */
	struct gp_diag diag;
	gp_diag_init(&diag);
	assert_null(gp_design_load_buffer("t.yaml", "a: \"x\\0y\"\n", 10,
					  NULL, 0, &diag));
	gp_diag_finish(&diag);
}

static void nearest_word(void **state)
{
	(void)state;
	const char *words[] = { "cell_pitch", "line_pitch", "dot_size" };
	assert_string_equal(gp_nearest_word("cel_pitch", words, 3),
			    "cell_pitch");
	assert_null(gp_nearest_word("colour", words, 3));
}

int main(void)
{
	const struct CMUnitTest tests[] = {
		cmocka_unit_test(base_loads),
		cmocka_unit_test(bad_yaml),
		cmocka_unit_test(unknown_key_suggests),
		cmocka_unit_test(duplicate_key),
		cmocka_unit_test(wrong_types),
		cmocka_unit_test(missing_and_range),
		cmocka_unit_test(dots_larger_than_pitch),
		cmocka_unit_test(too_many_decimals),
		cmocka_unit_test(overrides),
		cmocka_unit_test(override_value_applies),
		cmocka_unit_test(hostile_input),
		cmocka_unit_test(nearest_word),
	};
	return cmocka_run_group_tests(tests, NULL, NULL);
}
