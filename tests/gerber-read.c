#include "gerber-read.h"

#include "units.h"

#include <glib.h>

#include <stdarg.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>

struct reader {
	struct gr_file *file;
	int line;
	bool have_fs, have_mo, have_g01, ended, in_region;
	int current;                  /* selected D code, 0 for none */
	bool have_point;
	struct gp_point point;
	bool drawing;                 /* the last object is a draw to extend */
	struct gp_ring contour;       /* region contour being read */
	int contour_line;
	bool failed;
	/* the attribute dictionary (5.1) */
	char function[GR_VALUE_MAX];  /* .AperFunction, "" when unset */
	bool has_net;
	char net[GR_VALUE_MAX];
	char pin[GR_VALUE_MAX];
	const char *text;             /* the whole file, for .MD5 */
	const char *word_start;       /* where the current command began */
};

static bool violation(struct reader *r, const char *format, ...)
	__attribute__((format(printf, 2, 3)));

static bool violation(struct reader *r, const char *format, ...)
{
	if (r->failed)
		return false;
	r->failed = true;
	int n = snprintf(r->file->error, sizeof(r->file->error), "line %d: ",
			 r->line);
	va_list args;
	va_start(args, format);
	vsnprintf(r->file->error + n, sizeof(r->file->error) - (size_t)n,
		  format, args);
	va_end(args);
	return false;
}

static struct gr_object *add_object(struct reader *r, enum gr_kind kind,
				    int line)
{
	struct gr_file *f = r->file;
	struct gr_object *grown = realloc(
		f->objects, (f->object_count + 1) * sizeof(*grown));
	if (!grown)
		return NULL;
	f->objects = grown;
	struct gr_object *o = &f->objects[f->object_count++];
	memset(o, 0, sizeof(*o));
	o->kind = kind;
	o->line = line;
	o->aperture = kind == GR_REGION ? 0 : r->current;
	const struct gr_aperture *a = gr_aperture_find(f, o->aperture);
	snprintf(o->function, sizeof(o->function), "%s",
		 kind == GR_REGION ? r->function : a ? a->function : "");
	o->has_net = r->has_net;
	snprintf(o->net, sizeof(o->net), "%s", r->net);
	snprintf(o->pin, sizeof(o->pin), "%s", r->pin);
	if (r->pin[0] && kind != GR_FLASH)
		violation(r, ".P on a draw or region (spec 5.6.14: \"The .P "
			     "attribute can be attached to any pad belonging "
			     "to a component pin, and only to those\")");
	return o;
}

const struct gr_aperture *gr_aperture_find(const struct gr_file *file,
					   int code)
{
	for (size_t i = 0; i < file->aperture_count; i++)
		if (file->apertures[i].code == code)
			return &file->apertures[i];
	return NULL;
}

const char *gr_attribute(const struct gr_file *file, const char *name)
{
	size_t n = strlen(name);
	for (size_t i = 0; i < file->attribute_count; i++) {
		const char *a = file->attributes[i];
		if (strncmp(a, "TF", 2) == 0 && strncmp(a + 2, name, n) == 0 &&
		    (a[2 + n] == ',' || a[2 + n] == '\0'))
			return a[2 + n] ? a + 3 + n : "";
	}
	return NULL;
}

/* A positive decimal size in mm, read exactly. */
static bool read_size(struct reader *r, const char *text, int64_t *nm)
{
	const char *why = NULL;
	if (!gp_parse_mm(text, nm, &why) || *nm <= 0 || text[0] == '-' ||
	    text[0] == '+')
		return violation(r, "aperture size '%s' is not a positive "
				    "decimal (spec 4.3)", text);
	return true;
}

static bool aperture_definition(struct reader *r, const char *word)
{
	char *end;
	long code = strtol(word + 3, &end, 10);
	if (end == word + 3 || code < 10 || code > 2147483647L)
		return violation(r, "aperture number in '%s' must be 10 or "
				    "more (spec 4.3)", word);
	if (gr_aperture_find(r->file, (int)code))
		return violation(r, "aperture D%ld defined twice (spec 4.3)",
				 code);
	struct gr_aperture a = { (int)code, *end, 0, 0, "" };
	snprintf(a.function, sizeof(a.function), "%s", r->function);
	char params[128];
	if ((*end != 'C' && *end != 'R') || end[1] != ',' ||
	    strlen(end + 2) >= sizeof(params))
		return violation(r, "'%s': only C and R apertures are written "
				    "(spec 4.4)", word);
	strcpy(params, end + 2);
	char *x = strchr(params, 'X');
	if (x)
		*x = '\0';
	if (!read_size(r, params, &a.a))
		return false;
	if (a.kind == 'C' && x)
		return violation(r, "'%s': circle with a hole (spec 4.4.2)",
				 word);
	if (a.kind == 'R' &&
	    (!x || strchr(x + 1, 'X') || !read_size(r, x + 1, &a.b)))
		return r->failed ? false
				 : violation(r, "'%s': rectangle needs "
						"WIDTHXHEIGHT (spec 4.4.3)",
					     word);
	struct gr_aperture *grown =
		realloc(r->file->apertures,
			(r->file->aperture_count + 1) * sizeof(*grown));
	if (!grown)
		return violation(r, "out of memory");
	r->file->apertures = grown;
	grown[r->file->aperture_count++] = a;
	return true;
}

/* .AperFunction values the writer may use, from the tables of 5.6.10. */
static bool known_function(const char *value)
{
	static const char *const plain[] = {
		"Conductor", "NonConductor", "ConnectorPad", "Profile",
		"Material", "NonMaterial", NULL,
	};
	for (int i = 0; plain[i]; i++)
		if (strcmp(value, plain[i]) == 0)
			return true;
	/* "Other,<mandatory field>" */
	return strncmp(value, "Other,", 6) == 0 && value[6] != '\0';
}

static bool set_value(struct reader *r, char *slot, const char *value)
{
	if (strlen(value) >= GR_VALUE_MAX)
		return violation(r, "attribute value too long for the test "
				    "reader");
	strcpy(slot, value);
	return true;
}

/* %TA, %TO, %TD (5.3-5.5). */
static bool dictionary_word(struct reader *r, const char *word)
{
	if (strncmp(word, "TA.AperFunction,", 16) == 0) {
		if (!known_function(word + 16))
			return violation(r, "'%s': not an .AperFunction value "
					    "of spec 5.6.10", word);
		return set_value(r, r->function, word + 16);
	}
	if (strncmp(word, "TO.N,", 5) == 0 || strcmp(word, "TO.N") == 0) {
		r->has_net = true;
		return set_value(r, r->net, word[4] ? word + 5 : "");
	}
	if (strncmp(word, "TO.P,", 5) == 0) {
		/* <refdes>,<number>[,<function>], number not empty */
		const char *comma = strchr(word + 5, ',');
		if (comma == word + 5 || !comma || comma[1] == '\0' ||
		    comma[1] == ',')
			return violation(r, "'%s': .P needs a reference and a "
					    "pin number (spec 5.6.14)", word);
		return set_value(r, r->pin, word + 5);
	}
	if (strcmp(word, "TD") == 0) {
		r->function[0] = r->net[0] = r->pin[0] = '\0';
		r->has_net = false;
		return true;
	}
	if (strcmp(word, "TD.AperFunction") == 0) {
		r->function[0] = '\0';
		return true;
	}
	if (strcmp(word, "TD.N") == 0) {
		r->net[0] = '\0';
		r->has_net = false;
		return true;
	}
	if (strcmp(word, "TD.P") == 0) {
		r->pin[0] = '\0';
		return true;
	}
	return violation(r, "'%%%s': an attribute the writer does not use",
			 word);
}

/* 5.6.9: "The signature is calculated over the bits from the beginning
 * of the file up to but excluding the .MD5 file attribute command
 * itself ... Any CR and LF are excluded". */
static bool check_md5(struct reader *r, const char *given)
{
	GChecksum *md5 = g_checksum_new(G_CHECKSUM_MD5);
	if (!md5)
		return violation(r, "out of memory");
	for (const char *p = r->text; p < r->word_start; p++)
		if (*p != '\r' && *p != '\n')
			g_checksum_update(md5, (const guchar *)p, 1);
	bool same = strcmp(g_checksum_get_string(md5), given) == 0;
	g_checksum_free(md5);
	r->file->has_md5 = true;
	return same ? true
		    : violation(r, ".MD5 %s does not match the file (spec "
				   "5.6.9)", given);
}

static bool extended_word(struct reader *r, const char *word)
{
	if (strncmp(word, "FS", 2) == 0) {
		if (strcmp(word, "FSLAX46Y46") != 0)
			return violation(r, "'%s': the writer uses FSLAX46Y46 "
					    "(spec 4.2.2)", word);
		if (r->have_fs)
			return violation(r, "FS given twice (spec 4.2.2)");
		r->have_fs = true;
	} else if (strncmp(word, "MO", 2) == 0) {
		if (strcmp(word, "MOMM") != 0 || r->have_mo)
			return violation(r, "'%s': expected one %%MOMM*%% "
					    "(spec 4.2.1)", word);
		r->have_mo = true;
	} else if (strncmp(word, "AD", 2) == 0) {
		return aperture_definition(r, word);
	} else if (strncmp(word, "LP", 2) == 0) {
		if (strcmp(word, "LPD") != 0)
			return violation(r, "'%s': only dark polarity is "
					    "written (spec 4.9.2)", word);
	} else if (strncmp(word, "TA", 2) == 0 || strncmp(word, "TO", 2) == 0 ||
		   strncmp(word, "TD", 2) == 0) {
		if (r->in_region)
			return violation(r, "attribute inside a region (spec "
					    "5.4)");
		return dictionary_word(r, word);
	} else if (strncmp(word, "TF.MD5,", 7) == 0) {
		return check_md5(r, word + 7);
	} else if (strncmp(word, "TF.", 3) == 0) {
		if (r->in_region)
			return violation(r, "attribute inside a region");
		char *copy = strdup(word);
		char **grown = realloc(r->file->attributes,
				       (r->file->attribute_count + 1) *
					       sizeof(*grown));
		if (!copy || !grown) {
			free(copy);
			if (grown)
				r->file->attributes = grown;
			return violation(r, "out of memory");
		}
		r->file->attributes = grown;
		grown[r->file->attribute_count++] = copy;
	} else {
		return violation(r, "'%%%s': extended command not written by "
				    "glassplot, or deprecated (spec 8)", word);
	}
	return true;
}

/* "X<int>Y<int>D0n" with at most 10 digits each (4.6, spec 4.2.2). */
static bool read_coordinates(struct reader *r, const char *word,
			     struct gp_point *p, int *operation)
{
	const char *s = word;
	int64_t values[2];
	for (int k = 0; k < 2; k++) {
		if (*s++ != "XY"[k])
			return violation(r, "'%s': expected X<n>Y<n>D0<n>, both "
					    "coordinates given (spec 4.8)",
					 word);
		bool negative = *s == '-';
		if (*s == '-' || *s == '+')
			s++;
		int digits = 0;
		int64_t v = 0;
		for (; *s >= '0' && *s <= '9'; s++, digits++)
			if (digits < 10)
				v = v * 10 + (*s - '0');
		if (digits == 0 || digits > 10)
			return violation(r, "'%s': coordinate needs 1 to 10 "
					    "digits in format 4.6 (spec "
					    "4.2.2)", word);
		values[k] = negative ? -v : v;
	}
	if (s[0] != 'D' || s[1] != '0' || s[2] < '1' || s[2] > '3' || s[3])
		return violation(r, "'%s': coordinates need an explicit D01, "
				    "D02 or D03 (spec 4.8, 8.3)", word);
	if (!r->have_fs || !r->have_mo)
		return violation(r, "coordinates before FS and MO (spec "
				    "4.2)");
	*p = (struct gp_point){ values[0], values[1] };
	*operation = s[2] - '0';
	return true;
}

static bool end_contour(struct reader *r)
{
	struct gp_ring *c = &r->contour;
	if (c->count == 0)
		return true;
	struct gp_point first = c->points[0], last = c->points[c->count - 1];
	if (c->count < 4 || first.x != last.x || first.y != last.y)
		return violation(r, "region contour from line %d is not "
				    "closed exactly (spec 4.10.3)",
				 r->contour_line);
	struct gr_object *o = add_object(r, GR_REGION, r->contour_line);
	if (!o)
		return violation(r, "out of memory");
	c->count--; /* drop the closing repeat */
	o->points = *c;
	gp_ring_init(c);
	char why[200];
	if (!gr_contour_check(&o->points, why, sizeof(why)))
		return violation(r, "region contour from line %d is not valid "
				    "(spec 4.10.3): %s", r->contour_line, why);
	return true;
}

static bool region_operation(struct reader *r, struct gp_point p, int op)
{
	if (op == 3)
		return violation(r, "D03 inside a region (spec 4.10.1)");
	if (op == 2) {
		if (!end_contour(r))
			return false;
		r->contour_line = r->line;
	} else {
		if (r->contour.count == 0)
			return violation(r, "contour does not start with D02 "
					    "(spec 4.10.3)");
		struct gp_point q = r->contour.points[r->contour.count - 1];
		if (q.x == p.x && q.y == p.y)
			return violation(r, "zero-length contour segment "
					    "(spec 4.10.3)");
	}
	if (!gp_ring_push(&r->contour, p.x, p.y))
		return violation(r, "out of memory");
	return true;
}

static bool plain_operation(struct reader *r, struct gp_point p, int op)
{
	const struct gr_aperture *a = gr_aperture_find(r->file, r->current);
	if (op != 2 && !a)
		return violation(r, "D0%d with no aperture selected (spec "
				    "4.6)", op);
	if (op == 2) {
		r->drawing = false;
	} else if (op == 3) {
		struct gr_object *o = add_object(r, GR_FLASH, r->line);
		if (!o || !gp_ring_push(&o->points, p.x, p.y))
			return violation(r, "out of memory");
		r->drawing = false;
	} else {
		if (!r->have_g01 || !r->have_point)
			return violation(r, "D01 before G01 or with no current "
					    "point (spec 4.7, 4.8)");
		if (a->kind != 'C')
			return violation(r, "draw with a rectangular aperture "
					    "(deprecated, spec 8)");
		if (p.x == r->point.x && p.y == r->point.y)
			return violation(r, "zero-length draw");
		if (!r->drawing) {
			struct gr_object *o = add_object(r, GR_DRAW, r->line);
			if (!o || !gp_ring_push(&o->points, r->point.x,
						r->point.y))
				return violation(r, "out of memory");
			r->drawing = true;
		}
		struct gr_object *o =
			&r->file->objects[r->file->object_count - 1];
		if (!gp_ring_push(&o->points, p.x, p.y))
			return violation(r, "out of memory");
	}
	return true;
}

static bool normal_word(struct reader *r, const char *word)
{
	if (strncmp(word, "G04", 3) == 0)
		return true;
	if (strcmp(word, "G01") == 0) {
		r->have_g01 = true;
		return true;
	}
	if (strcmp(word, "G36") == 0) {
		if (r->in_region)
			return violation(r, "G36 inside a region (spec 4.10)");
		r->in_region = true;
		r->drawing = false;
		return true;
	}
	if (strcmp(word, "G37") == 0) {
		if (!r->in_region || !end_contour(r))
			return r->failed ? false
					 : violation(r, "G37 without G36 "
							"(spec 4.10)");
		r->in_region = false;
		return true;
	}
	if (strcmp(word, "M02") == 0) {
		if (r->in_region)
			return violation(r, "M02 inside a region (spec 4.10)");
		r->ended = true;
		return true;
	}
	if (word[0] == 'D' && word[1] != '0') {
		char *end;
		long code = strtol(word + 1, &end, 10);
		if (*end || code < 10 || !gr_aperture_find(r->file, (int)code))
			return violation(r, "'%s' selects an aperture not "
					    "defined before (spec 4.6)", word);
		if (r->in_region)
			return violation(r, "aperture selected inside a region "
					    "(spec 4.10.1)");
		r->current = (int)code;
		return true;
	}
	if (word[0] == 'X') {
		struct gp_point p = { 0, 0 };
		int op = 0;
		if (!read_coordinates(r, word, &p, &op))
			return false;
		bool ok = r->in_region ? region_operation(r, p, op)
				       : plain_operation(r, p, op);
		r->point = p;
		r->have_point = true;
		return ok;
	}
	return violation(r, "'%s': command not written by glassplot, or "
			    "deprecated (spec 8)", word);
}

/* Copies the next word ending with '*' into buffer, skipping line breaks
 * (spec 3.3: they carry no meaning). */
static bool next_word(struct reader *r, const char **p, const char *end,
		      char *buffer, size_t size)
{
	size_t n = 0;
	for (; *p < end && **p != '*'; (*p)++) {
		if (**p == '\n') {
			r->line++;
			continue;
		}
		if (**p == '\r')
			continue;
		if (**p == '%')
			return violation(r, "'%%' inside a word (spec 3.3)");
		if (n + 1 >= size)
			return violation(r, "word too long");
		buffer[n++] = **p;
	}
	if (*p == end)
		return violation(r, "word not ended by '*' (spec 3.3)");
	(*p)++;
	buffer[n] = '\0';
	return true;
}

static void skip_breaks(struct reader *r, const char **p, const char *end)
{
	for (; *p < end && (**p == '\n' || **p == '\r'); (*p)++)
		if (**p == '\n')
			r->line++;
}

static bool read_all(struct reader *r, const char *text, size_t size)
{
	const char *p = text, *end = text + size;
	char word[4096];
	for (skip_breaks(r, &p, end); p < end; skip_breaks(r, &p, end)) {
		if (r->ended)
			return violation(r, "data after M02 (spec 4.13)");
		if (*p != '%') {
			if (!next_word(r, &p, end, word, sizeof(word)) ||
			    !normal_word(r, word))
				return false;
			continue;
		}
		r->word_start = p;
		p++; /* an extended command: words up to the closing '%' */
		do {
			if (!next_word(r, &p, end, word, sizeof(word)) ||
			    !extended_word(r, word))
				return false;
		} while (p < end && *p != '%');
		if (p == end)
			return violation(r, "extended command not closed by "
					    "'%%' (spec 3.4)");
		p++;
	}
	if (!r->ended)
		return violation(r, "the file does not end with M02 (spec "
				    "4.13)");
	return true;
}

bool gr_read(const char *text, size_t size, struct gr_file *file)
{
	memset(file, 0, sizeof(*file));
	struct reader r = { .file = file, .line = 1, .text = text };
	gp_ring_init(&r.contour);
	bool ok = read_all(&r, text, size);
	gp_ring_finish(&r.contour);
	return ok && !r.failed;
}

void gr_file_finish(struct gr_file *file)
{
	for (size_t i = 0; i < file->object_count; i++)
		gp_ring_finish(&file->objects[i].points);
	for (size_t i = 0; i < file->attribute_count; i++)
		free(file->attributes[i]);
	free(file->objects);
	free(file->apertures);
	free(file->attributes);
	memset(file, 0, sizeof(*file));
}

/* --- spec 4.10.3, valid contours -------------------------------------- */

__extension__ typedef __int128 gr_wide;

static int gr_side(struct gp_point o, struct gp_point a, struct gp_point b)
{
	gr_wide v = (gr_wide)(a.x - o.x) * (b.y - o.y) -
		    (gr_wide)(a.y - o.y) * (b.x - o.x);
	return (v > 0) - (v < 0);
}

static bool gr_same(struct gp_point a, struct gp_point b)
{
	return a.x == b.x && a.y == b.y;
}

/* p on the closed segment [a, b] */
static bool gr_on(struct gp_point a, struct gp_point b, struct gp_point p)
{
	return gr_side(a, b, p) == 0 &&
	       p.x >= (a.x < b.x ? a.x : b.x) && p.x <= (a.x < b.x ? b.x : a.x) &&
	       p.y >= (a.y < b.y ? a.y : b.y) && p.y <= (a.y < b.y ? b.y : a.y);
}

static bool gr_meet(struct gp_point a, struct gp_point b, struct gp_point c,
		    struct gp_point d)
{
	int d1 = gr_side(c, d, a), d2 = gr_side(c, d, b);
	int d3 = gr_side(a, b, c), d4 = gr_side(a, b, d);
	if (d1 * d2 < 0 && d3 * d4 < 0)
		return true;
	return gr_on(c, d, a) || gr_on(c, d, b) || gr_on(a, b, c) ||
	       gr_on(a, b, d);
}

static bool gr_complain(char *why, size_t size, const char *format, ...)
	__attribute__((format(printf, 3, 4)));

static bool gr_complain(char *why, size_t size, const char *format, ...)
{
	va_list args;
	va_start(args, format);
	vsnprintf(why, size, format, args);
	va_end(args);
	return false;
}

/* Is p an end of a cut-in of r, given the cut-in pairs found? */
struct gr_cut {
	struct gp_point a, b;
};

static bool gr_cut_end(const struct gr_cut *cuts, size_t n, struct gp_point p)
{
	for (size_t i = 0; i < n; i++)
		if (gr_same(cuts[i].a, p) || gr_same(cuts[i].b, p))
			return true;
	return false;
}

/* The rules, in the words of the Gerber Layer Format Specification
 * (Ucamco, 2024.05), 4.10.3 "Valid Contours":
 * - "A contour is said to be simple if all its segments are disjointed,
 *   except for consecutive segments having only their connection point
 *   in common."  "zero-length draws ... are therefore not allowed";
 * - a cut-in "must consist of two fully-coincident linear segments";
 *   "cut-ins must be either horizontal or vertical"; "all cut-ins in a
 *   contour must have the same direction"; "cut-ins can only touch or
 *   overlap the contour in their start and end points";
 * - "Any other form of self-touching, self-intersection or self-
 *   overlapping is not allowed ... vertices on a segment at another
 *   location than its endpoints, points where more than two segments
 *   end" (read, as the spec's own cut-in example 4.10.4.7 has it, as
 *   apart from the ends of a cut-in, where its two segments end too). */
bool gr_contour_check(const struct gp_ring *r, char *why, size_t size)
{
	size_t n = r->count;
	if (n < 3)
		return gr_complain(why, size, "fewer than 3 segments");
	struct gr_cut *cuts = calloc(n, sizeof(*cuts));
	size_t cut_count = 0;
	int direction = 0; /* 1 horizontal, 2 vertical */
	bool ok = cuts != NULL;
	if (!ok)
		return gr_complain(why, size, "out of memory");
	/* first the cut-in pairs */
	for (size_t i = 0; i < n && ok; i++) {
		struct gp_point a = r->points[i], b = r->points[(i + 1) % n];
		if (gr_same(a, b))
			ok = gr_complain(why, size, "segment %zu has zero length", i);
		for (size_t j = i + 1; j < n && ok; j++) {
			struct gp_point c = r->points[j];
			struct gp_point d = r->points[(j + 1) % n];
			if (!gr_same(a, d) || !gr_same(b, c))
				continue;
			int dir = a.y == b.y ? 1 : a.x == b.x ? 2 : 0;
			if (dir == 0)
				ok = gr_complain(why, size,
						 "cut-in (%lld, %lld)-(%lld, %lld) "
						 "is neither horizontal nor "
						 "vertical",
						 (long long)a.x, (long long)a.y,
						 (long long)b.x, (long long)b.y);
			else if (direction && dir != direction)
				ok = gr_complain(why, size, "cut-ins run both "
						 "horizontally and vertically");
			direction = dir;
			cuts[cut_count++] = (struct gr_cut){ a, b };
		}
	}
	/* then every other meeting of two segments */
	for (size_t i = 0; i < n && ok; i++) {
		struct gp_point a = r->points[i], b = r->points[(i + 1) % n];
		struct gp_box ab = gp_box_make(a.x, a.y, b.x, b.y);
		for (size_t j = i + 1; j < n && ok; j++) {
			struct gp_point c = r->points[j];
			struct gp_point d = r->points[(j + 1) % n];
			struct gp_box cd = gp_box_make(c.x, c.y, d.x, d.y);
			if (cd.x0 > ab.x1 || cd.x1 < ab.x0 || cd.y0 > ab.y1 ||
			    cd.y1 < ab.y0 || !gr_meet(a, b, c, d))
				continue;
			if (gr_same(a, d) && gr_same(b, c))
				continue; /* a cut-in pair */
			bool next = j == i + 1, wrap = i == 0 && j == n - 1;
			struct gp_point shared;
			bool at_end = false;
			if (gr_same(a, c) || gr_same(a, d))
				shared = a, at_end = true;
			else if (gr_same(b, c) || gr_same(b, d))
				shared = b, at_end = true;
			/* only the shared end in common, nothing more */
			struct gp_point far_ab = gr_same(a, shared) ? b : a;
			struct gp_point far_cd = gr_same(c, shared) ? d : c;
			if (!at_end || gr_on(a, b, far_cd) || gr_on(c, d, far_ab))
				ok = gr_complain(why, size,
						 "segments %zu and %zu cross, "
						 "overlap or touch away from "
						 "their ends", i, j);
			else if (!next && !wrap &&
				 !gr_cut_end(cuts, cut_count, shared))
				ok = gr_complain(why, size,
						 "segments %zu and %zu touch at "
						 "(%lld, %lld), which is no "
						 "cut-in's end", i, j,
						 (long long)shared.x,
						 (long long)shared.y);
		}
	}
	/* a point passed more than twice has more than four segments
	 * ending at it; one passed twice must be a cut-in's end */
	for (size_t i = 0; i < n && ok; i++) {
		size_t seen = 0;
		for (size_t j = 0; j < n; j++)
			seen += gr_same(r->points[i], r->points[j]);
		if (seen > 2 || (seen == 2 && !gr_cut_end(cuts, cut_count,
							   r->points[i])))
			ok = gr_complain(why, size,
					 "%zu segments end at (%lld, %lld)",
					 2 * seen, (long long)r->points[i].x,
					 (long long)r->points[i].y);
	}
	free(cuts);
	return ok;
}
