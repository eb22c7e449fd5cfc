/* The pin table (pins.csv) and the firmware map (a generated C header). */
#include "digits.h"
#include "pinmap.h"
#include "route.h"

#include "escape.h"
#include "pintable.h"
#include "stage.h"
#include "units.h"

#include "gp-config.h"

#include <ctype.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>

bool gp_pins_csv(const struct gp_build *build, struct gp_buffer *out)
{
	const struct gp_pin **pins = gp_pins_in_order(build);
	if (!pins)
		return false;
	struct gp_buffer drives;
	gp_buffer_init(&drives);
	gp_buffer_puts(out, "pin,ledge,x,y,net,role,drives\r\n");
	for (size_t i = 0; i < build->pin_count; i++) {
		const struct gp_pin *p = pins[i];
		char x[32], y[32];
		gp_format_mm(x, sizeof(x), p->centre.x);
		gp_format_mm(y, sizeof(y), p->centre.y);
		const struct gp_net *net =
			p->net >= 0 ? &build->art.nets[p->net] : NULL;
		drives.size = 0;
		gp_net_drives(build, p->net, &drives);
		gp_buffer_append(&drives, "", 1);
		const char *fields[] = {
			build->ledges[p->ledge].name, x, y,
			net ? net->name : "NC",
			!net ? "none"
			: net->kind == GP_NET_COMMON ? "common"
						     : "segment",
			drives.data ? drives.data : "",
		};
		gp_buffer_printf(out, "%d", p->number);
		for (size_t f = 0; f < sizeof(fields) / sizeof(fields[0]); f++) {
			gp_buffer_puts(out, ",");
			gp_escape_csv(out, fields[f]);
		}
		gp_buffer_puts(out, "\r\n");
	}
	out->failed |= drives.failed;
	gp_buffer_finish(&drives);
	free(pins);
	return !out->failed;
}

/* C identifier made of a name: lower case letters, digits, '_'. */
static void identifier(const char *name, char *out, size_t size, bool upper)
{
	size_t n = 0;
	if (!isalpha((unsigned char)name[0]) && size > 2)
		out[n++] = upper ? 'G' : 'g';
	for (const char *c = name; *c && n + 1 < size; c++)
		out[n++] = isalnum((unsigned char)*c)
				   ? (char)(upper ? toupper((unsigned char)*c)
						  : tolower((unsigned char)*c))
				   : '_';
	out[n] = '\0';
}

/* The identifier of block index; a block whose name maps to the same
 * identifier as an earlier one's ("a-b", "a_b") gets its number
 * appended, so that no two functions share a name. */
static void block_identifier(const struct gp_build *build, size_t index,
			     char *out, size_t size)
{
	const struct gp_design *d = build->design;
	char mine[128], other[128];
	identifier(d->blocks[index].name, mine, sizeof(mine), false);
	bool taken = false;
	for (size_t i = 0; i < d->block_count && !taken; i++) {
		if (i == index)
			continue;
		identifier(d->blocks[i].name, other, sizeof(other), false);
		taken = strcmp(mine, other) == 0 && i < index;
	}
	if (taken)
		snprintf(out, size, "%s_%zu", mine, index + 1);
	else
		snprintf(out, size, "%s", mine);
}

static int net_number(const struct gp_build *build, int net)
{
	return net >= 0 ? build->art.nets[net].number : 0;
}

static void pin_function(const struct gp_build *build, struct gp_buffer *o,
			 const char *p, enum gp_net_kind kind,
			 const char *what)
{
	int count = kind == GP_NET_COMMON ? build->art.common_count
					  : build->art.segment_count;
	gp_buffer_printf(o, "/* Pin of %s n (1..%d), 0 when there is none. */\n"
			 "static inline int %s_%s_pin(int n)\n{\n"
			 "\tstatic const unsigned short pin[%d] = {",
			 what, count, p, what, count ? count : 1);
	int k = 0;
	for (size_t i = 0; i < build->art.net_count; i++) {
		const struct gp_net *net = &build->art.nets[i];
		if (net->kind != kind)
			continue;
		gp_buffer_printf(o, "%s%s%d", k ? "," : "",
				 k % 16 == 0 ? "\n\t\t" : " ", net->pin);
		k++;
	}
	if (k == 0)
		gp_buffer_printf(o, "0");
	gp_buffer_printf(o, "\n\t};\n\treturn n >= 1 && n <= %d ? pin[n - 1] : 0;\n}\n\n",
			 count);
}

static void block_function(const struct gp_build *build, struct gp_buffer *o,
			   const char *p, size_t index)
{
	const struct gp_block *b = &build->design->blocks[index];
	const struct gp_block_nets *n = &build->blocks[index];
	char id[160];
	block_identifier(build, index, id, sizeof(id));
	long groups = b->share_segments ? 1 : b->lines;
	gp_buffer_puts(o, "/* Block '");
	gp_escape_c_comment(o, b->name);
	gp_buffer_printf(o,
			 "': %ld line(s) of %ld cell(s), %ld x %ld "
			 "dots each.\n * line, cell, row and column count from 0 "
			 "at the top left. */\n"
			 "static inline bool %s_%s_dot(int line, int cell, int "
			 "row, int column,\n\t\t\t\tstruct %s_drive *out)\n{\n",
			 b->lines, b->cells, b->dots_across,
			 b->dots_down, p, id, p);
	gp_buffer_printf(o, "\tstatic const unsigned short common[%ld][%ld] = {\n",
			 b->lines, b->dots_down);
	for (long line = 0; line < b->lines; line++) {
		gp_buffer_printf(o, "\t\t{");
		for (long row = 0; row < b->dots_down; row++)
			gp_buffer_printf(o, "%s%d", row ? ", " : " ",
					 net_number(build,
						    n->first_common +
							    (int)(line * b->dots_down +
								  row)));
		gp_buffer_printf(o, " },\n");
	}
	gp_buffer_printf(o, "\t};\n\tstatic const unsigned short segment[%ld][%ld][%ld] = {\n",
			 groups, b->cells, b->dots_across);
	for (long g = 0; g < groups; g++) {
		gp_buffer_printf(o, "\t\t{\n");
		for (long cell = 0; cell < b->cells; cell++) {
			gp_buffer_printf(o, "\t\t\t{");
			for (long col = 0; col < b->dots_across; col++)
				gp_buffer_printf(
					o, "%s%d", col ? ", " : " ",
					net_number(build,
						   n->first_segment +
							   (int)((g * b->cells + cell) *
								 b->dots_across +
							 col)));
			gp_buffer_printf(o, " },\n");
		}
		gp_buffer_printf(o, "\t\t},\n");
	}
	gp_buffer_printf(o,
			 "\t};\n"
			 "\tif (line < 0 || line >= %ld || cell < 0 || cell >= %ld ||\n"
			 "\t    row < 0 || row >= %ld || column < 0 || column >= %ld)\n"
			 "\t\treturn false;\n"
			 "\tout->common = common[line][row];\n"
			 "\tout->segment = segment[%s][cell][column];\n"
			 "\tout->common_pin = %s_common_pin(out->common);\n"
			 "\tout->segment_pin = %s_segment_pin(out->segment);\n"
			 "\treturn true;\n}\n\n",
			 b->lines, b->cells, b->dots_down, b->dots_across,
			 b->share_segments ? "0" : "line", p, p);
}

/* Pixels that belong to digits and icons, as a table by index. */
static void element_table(const struct gp_build *build, struct gp_buffer *o,
			  const char *p)
{
	const struct gp_artwork *art = &build->art;
	size_t count = 0;
	for (size_t i = 0; i < art->pixel_count; i++)
		count += art->pixels[i].owner_kind != GP_OWNER_BLOCK;
	gp_buffer_printf(o, "/* Digit segments and icons: %zu. */\n#define %s_ELEMENT_COUNT %zu\n\n",
			 count, p, count);
	if (count == 0)
		return;
	gp_buffer_printf(o,
			 "struct %s_element {\n\tint kind;   /* 1 digit segment, 2 icon */\n"
			 "\tint owner;  /* digit row or icon, from 0 */\n"
			 "\tint a, b;   /* digit and segment (digits), 0 (icons) */\n"
			 "\tint common, segment;\n"
			 "\tconst char *name;  /* as in pin-matrix.csv: \"2DP\", "
			 "\"COL\", an icon's name */\n};\n\n"
			 "static inline bool %s_element(int i, struct %s_drive *out,\n"
			 "\t\t\t\tstruct %s_element *what)\n{\n"
			 "\tstatic const struct %s_element table[%zu] = {\n",
			 p, p, p, p, p, count);
	for (size_t i = 0; i < art->pixel_count; i++) {
		const struct gp_pixel *x = &art->pixels[i];
		if (x->owner_kind == GP_OWNER_BLOCK)
			continue;
		char what[192];
		gp_pixel_label(build, x, what, sizeof(what));
		gp_buffer_printf(o, "\t\t{ %d, %d, %d, %d, %d, %d, \"",
				 x->owner_kind, x->owner, x->a, x->b,
				 net_number(build, x->common),
				 net_number(build, x->segment));
		gp_escape_c_string(o, what);
		gp_buffer_puts(o, "\" },\n");
	}
	gp_buffer_printf(o,
			 "\t};\n\tif (i < 0 || i >= %zu)\n\t\treturn false;\n"
			 "\t*what = table[i];\n"
			 "\tout->common = table[i].common;\n"
			 "\tout->segment = table[i].segment;\n"
			 "\tout->common_pin = %s_common_pin(out->common);\n"
			 "\tout->segment_pin = %s_segment_pin(out->segment);\n"
			 "\treturn true;\n}\n\n",
			 count, p, p);
}

bool gp_firmware_header(const struct gp_build *build, struct gp_buffer *o)
{
	const struct gp_design *d = build->design;
	char p[96], up[96];
	identifier(d->part, p, sizeof(p), false);
	identifier(d->part, up, sizeof(up), true);
	gp_buffer_puts(o, "/* Firmware map of glass ");
	gp_escape_c_comment(o, d->part);
	gp_buffer_puts(o, " revision ");
	gp_escape_c_comment(o, d->revision);
	gp_buffer_printf(o,
			 ", generated by "
			 "glassplot %s.\n"
			 " * Do not edit: regenerate it from the description.\n"
			 " *\n"
			 " * Every pixel is driven by one common (COMn) and one "
			 "segment (SEGn); the\n"
			 " * functions below give both numbers (from 1) and the "
			 "pins (as in pins.csv)\n"
			 " * they are brought out on. */\n"
			 "#ifndef %s_GLASS_H\n#define %s_GLASS_H\n\n"
			 "#include <stdbool.h>\n\n"
			 "#define %s_COMMONS %d\n#define %s_SEGMENTS %d\n"
			 "#define %s_PINS %zu\n\n"
			 "struct %s_drive {\n\tint common, segment;\n"
			 "\tint common_pin, segment_pin;\n};\n\n",
			 GP_VERSION, up, up, up,
			 build->art.common_count, up, build->art.segment_count,
			 up, build->pin_count, p);
	pin_function(build, o, p, GP_NET_COMMON, "common");
	pin_function(build, o, p, GP_NET_SEGMENT, "segment");
	for (size_t i = 0; i < d->block_count; i++)
		block_function(build, o, p, i);
	element_table(build, o, p);
	gp_buffer_printf(o, "#endif\n");
	return !o->failed;
}

bool gp_route_write(const struct gp_build *build, struct gp_output_set *set,
		    struct gp_diag *diag)
{
	bool wanted = gp_build_wants(build, GP_OUTPUT_PINS) ||
		      gp_build_wants(build, GP_OUTPUT_FIRMWARE);
	/* asked for by name, they must not vanish into an empty set */
	if (build->pin_count == 0 && wanted && build->outputs_chosen)
		return gp_diag_fail(diag, GP_MSG_NEEDS_LEDGES, NULL,
				    "pins.csv and glass-map.h need pads, and "
				    "this glass has no 'ledges'; leave pins "
				    "and firmware out of --only");
	if (build->pin_count == 0)
		return true;
	if (gp_build_wants(build, GP_OUTPUT_PINS)) {
		struct gp_buffer *csv = gp_output_add(set, "pins.csv", diag);
		if (!csv || !gp_pins_csv(build, csv))
			return gp_diag_fail(diag, GP_MSG_CANNOT_WRITE, NULL,
					    "pins.csv: cannot write it");
		struct gp_buffer *matrix =
			gp_output_add(set, "pin-matrix.csv", diag);
		if (!matrix || !gp_pin_matrix_csv(build, matrix))
			return gp_diag_fail(diag, GP_MSG_CANNOT_WRITE, NULL,
					    "pin-matrix.csv: cannot write it");
	}
	if (!gp_build_wants(build, GP_OUTPUT_FIRMWARE))
		return true;
	struct gp_buffer *h = gp_output_add(set, "glass-map.h", diag);
	if (!h || !gp_firmware_header(build, h))
		return gp_diag_fail(diag, GP_MSG_CANNOT_WRITE, NULL,
				    "glass-map.h: cannot write it");
	return true;
}
