/* Limits against hostile descriptions sit exactly where they are
 * documented (README "Robustness"): a description at a limit loads, one
 * step beyond it gets one error naming the limit.  And the nanometre
 * arithmetic of the largest block the limits allow is exact (under UBSan
 * any overflow would abort the test). */
#include <stdarg.h>
#include <stddef.h>
#include <setjmp.h>
#include <stdint.h>
#include <cmocka.h>

#include "digits.h"
#include "model.h"
#include "units.h"

#include <glib.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>

/* Glass and plates of the sample, with room for what tests add. */
static const char head[] =
	"glass: {part: GPX-L, title: %s}\n"
	"front: {size: [%s, 300], position: [0, 0]}\n"
	"back: {size: [300, 295], position: [0, 5]}\n"
	"viewing_area: {position: [5, 9], size: [280, 280]}\n";

/* Loads text with overrides; returns the number of errors and the first
 * message in *message (static storage, overwritten by the next call). */
static size_t load(const char *text, const char *const *overrides,
		   size_t override_count, const char **message)
{
	static char first[512];
	struct gp_diag diag;
	gp_diag_init(&diag);
	struct gp_design *design = gp_design_load_buffer(
		"limits.yaml", text, strlen(text), overrides, override_count,
		&diag);
	size_t errors = diag.errors;
	snprintf(first, sizeof(first), "%s",
		 diag.count ? diag.entries[0].message : "");
	*message = first;
	assert_true((design != NULL) == (errors == 0));
	gp_design_destroy(design);
	gp_diag_finish(&diag);
	return errors;
}

static GString *start(const char *title, const char *front_width)
{
	GString *s = g_string_new("");
	g_string_append_printf(s, head, title, front_width);
	return s;
}

static void expect_ok(GString *s, const char *const *overrides, size_t n)
{
	const char *message;
	size_t errors = load(s->str, overrides, n, &message);
	if (errors)
		fail_msg("expected no error, got: %s", message);
	g_string_free(s, TRUE);
}

static void expect_limit(GString *s, const char *const *overrides, size_t n,
			 const char *limit_text)
{
	const char *message;
	assert_int_equal(load(s->str, overrides, n, &message), 1);
	if (!strstr(message, limit_text))
		fail_msg("'%s' does not name the limit '%s'", message,
			 limit_text);
	g_string_free(s, TRUE);
}

static GString *blocks(size_t count)
{
	GString *s = start("t", "300");
	g_string_append(s, "blocks:\n");
	for (size_t i = 0; i < count; i++)
		g_string_append_printf(
			s, "  b%zu: {origin: [%zu, %zu], cells: [1, 1], "
			"dots: [5, 7], dot_size: [0.1, 0.1], "
			"dot_pitch: [0.2, 0.2]}\n",
			i, 10 + (i % 8) * 10, 200 - (i / 8) * 10);
	return s;
}

static void block_count(void **state)
{
	(void)state;
	expect_ok(blocks(GP_MAX_BLOCKS), NULL, 0);
	expect_limit(blocks(GP_MAX_BLOCKS + 1), NULL, 0, "the limit is 64");
}

static GString *icons(size_t count)
{
	GString *s = start("t", "300");
	g_string_append(s, "icons:\n");
	for (size_t i = 0; i < count; i++)
		g_string_append_printf(
			s, "  i%zu: {shape: circle, diameter: 0.5, "
			"position: [%zu, %zu], common: c, segment: s%zu}\n",
			i, 10 + (i % 32) * 2, 10 + (i / 32) * 2, i);
	return s;
}

static void icon_count(void **state)
{
	(void)state;
	expect_ok(icons(GP_MAX_ICONS), NULL, 0);
	expect_limit(icons(GP_MAX_ICONS + 1), NULL, 0, "the limit is 512");
}

static GString *digits(size_t rows, size_t count)
{
	GString *s = start("t", "300");
	g_string_append(s, "digits:\n");
	for (size_t r = 0; r < rows; r++)
		g_string_append_printf(
			s, "  r%zu: {origin: [6, %zu], count: %zu, pitch: 4, "
			"segments: 7, height: 6, width: 3.5, stroke: 0.6, "
			"gap: 0.1, duty: 1}\n",
			r, 10 + r * 8, count);
	return s;
}

static void digit_total(void **state)
{
	(void)state;
	/* 4 rows of 64 = 256 digits; 5 rows of 52 = 260 */
	expect_ok(digits(4, GP_DIGITS_MAX_COUNT), NULL, 0);
	expect_limit(digits(5, 52), NULL, 0, "the limit is 256");
}

static void value_length(void **state)
{
	(void)state;
	char *at = g_strnfill(GP_SPEC_MAX_SCALAR, 'x');
	char *over = g_strnfill(GP_SPEC_MAX_SCALAR + 1, 'x');
	expect_ok(start(at, "300"), NULL, 0);
	expect_limit(start(over, "300"), NULL, 0, "the limit is 1024");
	g_free(at);
	g_free(over);
}

static GString *nested(int depth)
{
	/* the title value sits at depth 2; each [ adds one */
	GString *title = g_string_new("");
	for (int i = 0; i < depth - 2; i++)
		g_string_append_c(title, '[');
	g_string_append_c(title, 'x');
	for (int i = 0; i < depth - 2; i++)
		g_string_append_c(title, ']');
	GString *s = start(title->str, "300");
	g_string_free(title, TRUE);
	return s;
}

static void nesting(void **state)
{
	(void)state;
	/* a list title loads as a tree but is then refused as not text:
	 * the depth check comes first, with its own message */
	const char *message;
	GString *s = nested(GP_SPEC_MAX_DEPTH);
	assert_int_equal(load(s->str, NULL, 0, &message), 1);
	assert_null(strstr(message, "nesting"));
	g_string_free(s, TRUE);
	expect_limit(nested(GP_SPEC_MAX_DEPTH + 1), NULL, 0,
		     "nesting deeper than 32 levels");
}

static void override_count(void **state)
{
	(void)state;
	const char *sets[GP_SPEC_MAX_OVERRIDES + 1];
	for (size_t i = 0; i <= GP_SPEC_MAX_OVERRIDES; i++)
		sets[i] = "glass.revision=B";
	expect_ok(start("t", "300"), sets, GP_SPEC_MAX_OVERRIDES);
	expect_limit(start("t", "300"), sets, GP_SPEC_MAX_OVERRIDES + 1,
		     "the limit is 256");
}

/* The node limit counts the file and every override together. */
static void node_count(void **state)
{
	(void)state;
	GString *list = g_string_new("glass.notes=[");
	for (int i = 0; i < 60000; i++)
		g_string_append(list, i ? ", 1" : "1");
	g_string_append(list, "]");
	const char *sets[4] = { list->str, list->str, list->str, list->str };
	expect_limit(start("t", "300"), sets, 4, "more than 200000 values");
	g_string_free(list, TRUE);
}

static void plate_extent(void **state)
{
	(void)state;
	expect_ok(start("t", "9000"), NULL, 0);
	expect_limit(start("t", "9000.000001"), NULL, 0,
		     "within 9000 mm of the origin");
}

/* The largest block the limits allow, at the largest pitch: every dot
 * position is exact (checked against 128-bit arithmetic). */
static void block_arithmetic_exact(void **state)
{
	(void)state;
	struct gp_block b = {
		.origin = { -GP_LENGTH_MAX, GP_LENGTH_MAX },
		.cells = GP_MAX_CELLS, .lines = 1,
		.dots_across = 256, .dots_down = 16,
		.dot_width = GP_LENGTH_MAX, .dot_height = GP_LENGTH_MAX,
		.dot_pitch_x = GP_LENGTH_MAX, .dot_pitch_y = GP_LENGTH_MAX,
		.cell_pitch = GP_LENGTH_MAX, .line_pitch = GP_LENGTH_MAX,
	};
	__extension__ typedef __int128 wide;
	struct gp_point p = gp_block_dot(&b, 0, b.cells - 1, 15, 255);
	wide x = (wide)-GP_LENGTH_MAX + (wide)(GP_MAX_CELLS - 1) *
		 GP_LENGTH_MAX + (wide)255 * GP_LENGTH_MAX;
	wide y = (wide)GP_LENGTH_MAX - (wide)15 * GP_LENGTH_MAX;
	assert_true((wide)p.x == x);
	assert_true((wide)p.y == y);
	struct gp_box e = gp_block_extent(&b);
	assert_true((wide)e.x1 == x + GP_LENGTH_MAX);
	b.lines = GP_MAX_CELLS;
	b.cells = 1;
	p = gp_block_dot(&b, b.lines - 1, 0, 15, 0);
	assert_true((wide)p.y == (wide)GP_LENGTH_MAX -
					 (wide)(GP_MAX_CELLS - 1) *
						 GP_LENGTH_MAX -
					 (wide)15 * GP_LENGTH_MAX);
}

int main(void)
{
	const struct CMUnitTest tests[] = {
		cmocka_unit_test(block_count),
		cmocka_unit_test(icon_count),
		cmocka_unit_test(digit_total),
		cmocka_unit_test(value_length),
		cmocka_unit_test(nesting),
		cmocka_unit_test(override_count),
		cmocka_unit_test(node_count),
		cmocka_unit_test(plate_extent),
		cmocka_unit_test(block_arithmetic_exact),
	};
	return cmocka_run_group_tests(tests, NULL, NULL);
}
