/* The netlist read back from the written files (readback.h).  GEOS is
 * called directly here, not through lib/geos.c, so that the library's own
 * geometry code is not what checks it. */
#include "readback.h"

#include "gerber-read.h"

#include <geos_c.h>

#include <ctype.h>
#include <inttypes.h>
#include <math.h>
#include <stdarg.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>

#define MAX_PADS 512

struct plate {
	GEOSGeometry **pieces;
	int count;
};

struct pad {
	int pin;
	bool common;
	int plate;            /* 0 front, 1 back */
	struct gp_point at;
	GEOSGeometry *shape;
};

struct reader {
	GEOSContextHandle_t h;
	struct plate plates[2];
	GEOSGeometry **dots;
	int dot_count;
	struct pad pads[MAX_PADS];
	int pad_count;
	int *parent;          /* union-find over the pieces of both plates */
	char *why;
	size_t size;
};

static bool fail(struct reader *r, const char *format, ...)
{
	va_list ap;
	va_start(ap, format);
	vsnprintf(r->why, r->size, format, ap);
	va_end(ap);
	return false;
}

static const struct gp_buffer *file_of(const struct gp_output_set *set,
				       const char *name)
{
	for (size_t i = 0; i < set->count; i++)
		if (strcmp(set->files[i].name, name) == 0)
			return &set->files[i].content;
	return NULL;
}

static GEOSCoordSequence *sequence(struct reader *r, const struct gp_ring *ring,
				   bool close)
{
	unsigned n = (unsigned)ring->count + (close ? 1 : 0);
	GEOSCoordSequence *s = GEOSCoordSeq_create_r(r->h, n, 2);
	for (unsigned i = 0; s && i < n; i++) {
		const struct gp_point *p = &ring->points[i % ring->count];
		GEOSCoordSeq_setXY_r(r->h, s, i, (double)p->x, (double)p->y);
	}
	return s;
}

static GEOSGeometry *box_geometry(struct reader *r, double x0, double y0,
				  double x1, double y1)
{
	struct gp_point pts[4] = { { (int64_t)x0, (int64_t)y0 },
				   { (int64_t)x1, (int64_t)y0 },
				   { (int64_t)x1, (int64_t)y1 },
				   { (int64_t)x0, (int64_t)y1 } };
	struct gp_ring ring = { pts, 4, 4 };
	GEOSGeometry *shell = GEOSGeom_createLinearRing_r(
		r->h, sequence(r, &ring, true));
	return GEOSGeom_createPolygon_r(r->h, shell, NULL, 0);
}

/* One object of a Gerber file as a valid polygonal geometry. */
static GEOSGeometry *object_geometry(struct reader *r, const struct gr_file *f,
				     const struct gr_object *o)
{
	if (o->kind == GR_REGION) {
		if (o->points.count < 3)
			return NULL;
		GEOSGeometry *shell = GEOSGeom_createLinearRing_r(
			r->h, sequence(r, &o->points, true));
		GEOSGeometry *poly = GEOSGeom_createPolygon_r(r->h, shell, NULL, 0);
		GEOSGeometry *valid = poly ? GEOSMakeValid_r(r->h, poly) : NULL;
		GEOSGeom_destroy_r(r->h, poly);
		return valid;
	}
	const struct gr_aperture *a = gr_aperture_find(f, o->aperture);
	if (!a)
		return NULL;
	if (o->kind == GR_DRAW) {
		GEOSGeometry *line = GEOSGeom_createLineString_r(
			r->h, sequence(r, &o->points, false));
		GEOSGeometry *out = line ? GEOSBuffer_r(r->h, line,
							 (double)a->a / 2, 8)
					 : NULL;
		GEOSGeom_destroy_r(r->h, line);
		return out;
	}
	const struct gp_point *p = &o->points.points[0];
	if (a->kind == 'R')
		return box_geometry(r, (double)p->x - (double)a->a / 2,
				    (double)p->y - (double)a->b / 2,
				    (double)p->x + (double)a->a / 2,
				    (double)p->y + (double)a->b / 2);
	GEOSGeometry *pt = GEOSGeom_createPointFromXY_r(r->h, (double)p->x,
							 (double)p->y);
	GEOSGeometry *out = GEOSBuffer_r(r->h, pt, (double)a->a / 2, 8);
	GEOSGeom_destroy_r(r->h, pt);
	return out;
}

/* The connected pieces of everything a file draws. */
static bool pieces_of(struct reader *r, const struct gp_buffer *b,
		      const char *name, GEOSGeometry ***out, int *count,
		      int plate)
{
	struct gr_file f;
	if (!gr_read(b->data, b->size, &f)) {
		gr_file_finish(&f);
		return fail(r, "%s: %s", name, f.error);
	}
	GEOSGeometry **parts = calloc(f.object_count + 1, sizeof(*parts));
	unsigned n = 0;
	bool ok = parts != NULL;
	for (size_t i = 0; ok && i < f.object_count; i++) {
		const struct gr_object *o = &f.objects[i];
		GEOSGeometry *g = object_geometry(r, &f, o);
		if (!g) {
			ok = fail(r, "%s line %d: not a shape", name, o->line);
			break;
		}
		parts[n++] = g;
		const struct gr_aperture *a = gr_aperture_find(&f, o->aperture);
		if (plate >= 0 && o->kind == GR_FLASH && a && a->kind == 'R') {
			if (r->pad_count == MAX_PADS) {
				ok = fail(r, "too many pads");
				break;
			}
			struct pad *p = &r->pads[r->pad_count++];
			memset(p, 0, sizeof(*p));
			p->plate = plate;
			p->at = o->points.points[0];
			p->shape = GEOSGeom_clone_r(r->h, g);
		}
	}
	if (ok) {
		GEOSGeometry *all = GEOSGeom_createCollection_r(
			r->h, GEOS_GEOMETRYCOLLECTION, parts, n);
		GEOSGeometry *u = all ? GEOSUnaryUnion_r(r->h, all) : NULL;
		GEOSGeom_destroy_r(r->h, all);
		n = 0;
		int k = u ? GEOSGetNumGeometries_r(r->h, u) : 0;
		*out = calloc((size_t)k + 1, sizeof(**out));
		for (int i = 0; *out && i < k; i++)
			(*out)[i] = GEOSGeom_clone_r(r->h, GEOSGetGeometryN_r(r->h, u, i));
		*count = *out ? k : 0;
		GEOSGeom_destroy_r(r->h, u);
		ok = u && *out;
		if (!ok)
			fail(r, "%s: GEOS failed", name);
	} else {
		for (unsigned i = 0; i < n; i++)
			GEOSGeom_destroy_r(r->h, parts[i]);
	}
	free(parts);
	gr_file_finish(&f);
	return ok;
}

static int find(struct reader *r, int i)
{
	while (r->parent[i] != i)
		i = r->parent[i] = r->parent[r->parent[i]];
	return i;
}

static void join(struct reader *r, int a, int b)
{
	r->parent[find(r, a)] = find(r, b);
}

static int node(const struct reader *r, int plate, int piece)
{
	return plate ? r->plates[0].count + piece : piece;
}

/* pins.csv: pin, ledge, x, y, net, ...; names each pad by its centre. */
static bool name_pads(struct reader *r, const struct gp_buffer *csv)
{
	char *text = malloc(csv->size + 1);
	if (!text)
		return fail(r, "out of memory");
	memcpy(text, csv->data, csv->size);
	text[csv->size] = '\0';
	int named = 0;
	char *save = NULL;
	for (char *line = strtok_r(text, "\n", &save); line;
	     line = strtok_r(NULL, "\n", &save)) {
		int pin;
		char ledge[64], net[64];
		double x, y;
		if (sscanf(line, "%d,%63[^,],%lf,%lf,%63[^,]", &pin, ledge, &x,
			   &y, net) != 5)
			continue;
		int64_t px = llround(x * 1e6), py = llround(y * 1e6);
		for (int i = 0; i < r->pad_count; i++) {
			struct pad *p = &r->pads[i];
			if (llabs(p->at.x - px) <= 1 && llabs(p->at.y - py) <= 1) {
				p->pin = pin;
				p->common = strncmp(net, "COM", 3) == 0;
				named++;
			}
		}
	}
	free(text);
	for (int i = 0; i < r->pad_count; i++)
		if (!r->pads[i].pin)
			return fail(r, "the pad at (%" PRId64 ", %" PRId64 ") nm "
				    "is not in pins.csv", r->pads[i].at.x,
				    r->pads[i].at.y);
	return true;
}

/* Each dot joins every piece of both plates it touches. */
static bool join_transfers(struct reader *r)
{
	for (int d = 0; d < r->dot_count; d++) {
		int first = -1;
		for (int p = 0; p < 2; p++)
			for (int i = 0; i < r->plates[p].count; i++) {
				char hit = GEOSIntersects_r(r->h, r->dots[d],
							    r->plates[p].pieces[i]);
				if (hit == 2)
					return fail(r, "GEOS failed");
				if (!hit)
					continue;
				if (first >= 0)
					join(r, first, node(r, p, i));
				first = node(r, p, i);
			}
	}
	return true;
}

/* The component of each pad, with one piece on its plate. */
static bool pad_nodes(struct reader *r, int *pad_node)
{
	for (int k = 0; k < r->pad_count; k++) {
		const struct pad *p = &r->pads[k];
		int hits = 0;
		for (int i = 0; i < r->plates[p->plate].count; i++)
			if (GEOSIntersects_r(r->h, p->shape,
					     r->plates[p->plate].pieces[i]) == 1) {
				pad_node[k] = node(r, p->plate, i);
				hits++;
			}
		if (hits != 1)
			return fail(r, "pin %d touches %d pieces of its plate",
				    p->pin, hits);
	}
	int total = r->plates[0].count + r->plates[1].count;
	for (int k = 0; k < r->pad_count; k++) {
		int per[2] = { 0, 0 };
		for (int i = 0; i < total; i++)
			if (find(r, i) == find(r, pad_node[k]))
				per[i >= r->plates[0].count]++;
		if (per[0] > 1 || per[1] > 1)
			return fail(r, "pin %d reaches %d front and %d back "
				    "pieces", r->pads[k].pin, per[0], per[1]);
		for (int j = 0; j < k; j++)
			if (find(r, pad_node[j]) == find(r, pad_node[k]))
				return fail(r, "pins %d and %d are shorted",
					    r->pads[j].pin, r->pads[k].pin);
	}
	return true;
}

static int pad_of(struct reader *r, const int *pad_node, int n)
{
	for (int k = 0; k < r->pad_count; k++)
		if (find(r, pad_node[k]) == find(r, n))
			return k;
	return -1;
}

struct pairs {
	int (*items)[2];
	size_t count, capacity;
	double at[64][2], area[64]; /* where the first ones overlap, mm */
};

static bool pair_add(struct pairs *s, int c, int g)
{
	for (size_t i = 0; i < s->count; i++)
		if (s->items[i][0] == c && s->items[i][1] == g)
			return true;
	if (s->count == s->capacity) {
		size_t cap = s->capacity ? 2 * s->capacity : 64;
		void *grown = realloc(s->items, cap * sizeof(*s->items));
		if (!grown)
			return false;
		s->items = grown;
		s->capacity = cap;
	}
	s->items[s->count][0] = c;
	s->items[s->count][1] = g;
	s->count++;
	return true;
}

static bool pair_has(const struct pairs *s, int c, int g)
{
	for (size_t i = 0; i < s->count; i++)
		if (s->items[i][0] == c && s->items[i][1] == g)
			return true;
	return false;
}

/* Every piece inside the seal reaches a pad; overlaps of the plates
 * there, as (common pin, segment pin). */
static bool overlaps(struct reader *r, const int *pad_node, GEOSGeometry *inside,
		     struct pairs *found)
{
	for (int p = 0; p < 2; p++)
		for (int i = 0; i < r->plates[p].count; i++)
			if (GEOSIntersects_r(r->h, inside, r->plates[p].pieces[i]) == 1 &&
			    pad_of(r, pad_node, node(r, p, i)) < 0)
				return fail(r, "a %s piece inside the seal reaches "
					    "no pad (an open)", p ? "back" : "front");
	for (int i = 0; i < r->plates[0].count; i++) {
		GEOSGeometry *f = GEOSIntersection_r(r->h, r->plates[0].pieces[i],
						     inside);
		for (int k = 0; f && k < r->plates[1].count; k++) {
			if (GEOSIntersects_r(r->h, f, r->plates[1].pieces[k]) != 1)
				continue;
			GEOSGeometry *x = GEOSIntersection_r(r->h, f,
							     r->plates[1].pieces[k]);
			double area = 0;
			if (x)
				GEOSArea_r(r->h, x, &area);
			GEOSGeom_destroy_r(r->h, x);
			/* a touch, or a sliver under a square micrometre */
			if (area < 1e6)
				continue;
			int a = pad_of(r, pad_node, node(r, 0, i));
			int b = pad_of(r, pad_node, node(r, 1, k));
			if (a < 0 || b < 0 || r->pads[a].common == r->pads[b].common) {
				GEOSGeom_destroy_r(r->h, f);
				return fail(r, "front and back overlap between "
					    "pins %d and %d (not a common and "
					    "a segment)", a < 0 ? 0 : r->pads[a].pin,
					    b < 0 ? 0 : r->pads[b].pin);
			}
			int c = r->pads[a].common ? a : b, g = c == a ? b : a;
			if (!pair_has(found, r->pads[c].pin, r->pads[g].pin)) {
				/* where, for the message */
				GEOSGeometry *x2 = GEOSIntersection_r(
					r->h, f, r->plates[1].pieces[k]);
				GEOSGeometry *pt = x2 ? GEOSPointOnSurface_r(r->h, x2)
						      : NULL;
				double px = 0, py = 0;
				if (pt) {
					GEOSGeomGetX_r(r->h, pt, &px);
					GEOSGeomGetY_r(r->h, pt, &py);
				}
				GEOSGeom_destroy_r(r->h, pt);
				GEOSGeom_destroy_r(r->h, x2);
				if (found->count < 64) {
					found->at[found->count][0] = px / 1e6;
					found->at[found->count][1] = py / 1e6;
					found->area[found->count] = area / 1e12;
				}
			}
			if (!pair_add(found, r->pads[c].pin, r->pads[g].pin)) {
				GEOSGeom_destroy_r(r->h, f);
				return fail(r, "out of memory");
			}
		}
		GEOSGeom_destroy_r(r->h, f);
	}
	return true;
}

static bool write_file(const char *path, const char *data, size_t size)
{
	FILE *f = fopen(path, "wb");
	if (!f)
		return false;
	bool ok = fwrite(data, 1, size, f) == size;
	return fclose(f) == 0 && ok;
}

/* The pairs glass-map.h lists, from a program compiled against it. */
static bool map_pairs(struct reader *r, const struct gp_buffer *header,
		      const char *work, struct pairs *listed)
{
	char prefix[128] = "";
	const char *p = strstr(header->data, "_COMMONS ");
	const char *q = p;
	while (q && q > header->data && q[-1] != ' ')
		q--;
	if (!p || p - q >= (ptrdiff_t)sizeof(prefix))
		return fail(r, "glass-map.h: no _COMMONS");
	for (ptrdiff_t i = 0; i < p - q; i++)
		prefix[i] = (char)tolower((unsigned char)q[i]);
	char dir[512], path[600], command[2200];
	snprintf(dir, sizeof(dir), "%s/readback-XXXXXX", work);
	if (!mkdtemp(dir))
		return fail(r, "cannot make %s", dir);
	char probe[8192];
	/* the element table exists only when the glass has digits or icons */
	bool elements = strstr(header->data, "_element(int i") != NULL;
	size_t n = (size_t)snprintf(probe, sizeof(probe),
		"#include <stdio.h>\n#include \"glass-map.h\"\n"
		"#define CAT2(a, b) a##b\n#define CAT(a, b) CAT2(a, b)\n"
		"int main(void)\n{\n"
		"\tstruct CAT(PFX, _drive) d;\n"
		"\t(void)d;\n%s",
		elements ?
		"\tfor (int i = 0; i < CAT(PFX, _ELEMENT_COUNT); i++) {\n"
		"\t\tstruct CAT(PFX, _element) e;\n"
		"\t\tif (!CAT(PFX, _element)(i, &d, &e))\n\t\t\treturn 1;\n"
		"\t\tprintf(\"%d %d\\n\", d.common_pin, d.segment_pin);\n"
		"\t}\n" : "");
	/* every dot of every block, through its documented function:
	 * "Block 'NAME': L line(s) of C cell(s), X x Y dots each." */
	for (const char *b = strstr(header->data, "/* Block '"); b && n < 6000;
	     b = strstr(b + 1, "/* Block '")) {
		int lines, cells, across, down;
		const char *q2 = strchr(b + 10, '\'');
		if (!q2 || sscanf(q2, "': %d line(s) of %d cell(s), %d x %d dots",
				  &lines, &cells, &across, &down) != 4)
			return fail(r, "glass-map.h: cannot read '%.40s'", b);
		const char *fn = strstr(b, "static inline bool ");
		const char *paren = fn ? strchr(fn, '(') : NULL;
		if (!paren)
			return fail(r, "glass-map.h: no function after '%.40s'", b);
		fn += strlen("static inline bool ");
		n += (size_t)snprintf(probe + n, sizeof(probe) - n,
			"\tfor (int l = 0; l < %d; l++)\n"
			"\tfor (int c = 0; c < %d; c++)\n"
			"\tfor (int y = 0; y < %d; y++)\n"
			"\tfor (int x = 0; x < %d; x++)\n"
			"\t\tif (%.*s(l, c, y, x, &d))\n"
			"\t\t\tprintf(\"%%d %%d\\n\", d.common_pin, "
			"d.segment_pin);\n",
			lines, cells, down, across, (int)(paren - fn), fn);
	}
	n += (size_t)snprintf(probe + n, sizeof(probe) - n, "\treturn 0;\n}\n");
	snprintf(path, sizeof(path), "%s/glass-map.h", dir);
	bool ok = n < sizeof(probe) && write_file(path, header->data, header->size);
	snprintf(path, sizeof(path), "%s/probe.c", dir);
	ok = ok && write_file(path, probe, n);
	snprintf(command, sizeof(command),
		 "cd '%s' && cc -std=c11 -Wall -Werror -DPFX=%s -o probe probe.c "
		 "&& ./probe > pairs.txt", dir, prefix);
	ok = ok && system(command) == 0;
	snprintf(path, sizeof(path), "%s/pairs.txt", dir);
	FILE *f = ok ? fopen(path, "r") : NULL;
	int c, g;
	while (f && fscanf(f, "%d %d", &c, &g) == 2)
		ok &= pair_add(listed, c, g);
	if (f)
		fclose(f);
	snprintf(command, sizeof(command), "rm -rf '%s'", dir);
	if (system(command) != 0)
		ok = false;
	return ok || fail(r, "glass-map.h: the probe did not build or run");
}

static bool run(struct reader *r, const struct gp_output_set *set,
		struct gp_box inside_box, const char *work)
{
	static const char *const names[2] = { "front-ito.gbr", "back-ito.gbr" };
	for (int p = 0; p < 2; p++) {
		const struct gp_buffer *b = file_of(set, names[p]);
		if (!b)
			return fail(r, "no %s", names[p]);
		if (!pieces_of(r, b, names[p], &r->plates[p].pieces,
			       &r->plates[p].count, p))
			return false;
	}
	const struct gp_buffer *t = file_of(set, "transfer.gbr");
	if (t && !pieces_of(r, t, "transfer.gbr", &r->dots, &r->dot_count, -1))
		return false;
	const struct gp_buffer *csv = file_of(set, "pins.csv");
	const struct gp_buffer *header = file_of(set, "glass-map.h");
	if (!csv || !header)
		return fail(r, "no pins.csv or glass-map.h");
	if (!name_pads(r, csv))
		return false;
	int total = r->plates[0].count + r->plates[1].count;
	r->parent = calloc((size_t)total + 1, sizeof(*r->parent));
	int *pad_node = calloc((size_t)r->pad_count + 1, sizeof(*pad_node));
	static struct pairs zero;
	struct pairs found = zero, listed = zero;
	GEOSGeometry *inside = box_geometry(r, (double)inside_box.x0,
					    (double)inside_box.y0,
					    (double)inside_box.x1,
					    (double)inside_box.y1);
	bool ok = r->parent && pad_node && inside;
	for (int i = 0; ok && i < total; i++)
		r->parent[i] = i;
	ok = ok && join_transfers(r) && pad_nodes(r, pad_node) &&
	     overlaps(r, pad_node, inside, &found) &&
	     map_pairs(r, header, work, &listed);
	for (size_t i = 0; ok && i < found.count; i++)
		if (!pair_has(&listed, found.items[i][0], found.items[i][1]))
			ok = fail(r, "pins %d and %d overlap inside the seal "
				  "(%.6g mm^2 near (%.4f, %.4f) mm), but "
				  "glass-map.h lists no such element",
				  found.items[i][0], found.items[i][1],
				  i < 64 ? found.area[i] : 0, i < 64 ? found.at[i][0] : 0,
				  i < 64 ? found.at[i][1] : 0);
	for (size_t i = 0; ok && i < listed.count; i++)
		if (!pair_has(&found, listed.items[i][0], listed.items[i][1]))
			ok = fail(r, "glass-map.h lists pins %d and %d, which "
				  "do not overlap", listed.items[i][0],
				  listed.items[i][1]);
	GEOSGeom_destroy_r(r->h, inside);
	free(pad_node);
	free(found.items);
	free(listed.items);
	return ok;
}

bool readback_check(const struct gp_output_set *set, struct gp_box inside,
		    const char *work, char *why, size_t size)
{
	struct reader r;
	memset(&r, 0, sizeof(r));
	r.why = why;
	r.size = size;
	r.h = GEOS_init_r();
	bool ok = r.h && run(&r, set, inside, work);
	for (int p = 0; p < 2; p++) {
		for (int i = 0; i < r.plates[p].count; i++)
			GEOSGeom_destroy_r(r.h, r.plates[p].pieces[i]);
		free(r.plates[p].pieces);
	}
	for (int i = 0; i < r.dot_count; i++)
		GEOSGeom_destroy_r(r.h, r.dots[i]);
	free(r.dots);
	for (int i = 0; i < r.pad_count; i++)
		GEOSGeom_destroy_r(r.h, r.pads[i].shape);
	free(r.parent);
	if (r.h)
		GEOS_finish_r(r.h);
	return ok;
}
