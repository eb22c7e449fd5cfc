/* The grid router (see maze.h). */
#include "maze.h"

#include "array.h"

#include <math.h>
#include <stdlib.h>
#include <string.h>

enum {
	F_BLOCKED = 1 << 0,
	F_SOFT = 1 << 1,     /* passable at a cost */
	F_OWN = 1 << 2,
	F_TARGET = 1 << 3,
	F_SIDE = 1 << 4,     /* the path may end here (on a side) */
	F_CLOSED = 1 << 5,
	F_SHADOW = 1 << 6,
};

/* flags2 */
enum {
	F_DEEP_OWN = 1 << 0,
	F_DEEP_TARGET = 1 << 1,
};

/* Costs per cell step, and what a soft cell adds. */
#define STEP 1000u
#define DIAG 1414u
#define SOFT_COST 4000u
#define SHADOW_COST 30000u
/* Margin for what the grid cannot see, in cells (see maze.h). */
#define MARGIN 2.25

struct gp_maze {
	struct gp_box window;
	int64_t cell;
	int w, h;
	uint8_t *marks;     /* bit per layer */
	uint8_t *flags;
	uint8_t *flags2;
	uint8_t used;       /* layers marked at all */
};

static size_t at(const struct gp_maze *m, int i, int j)
{
	return (size_t)j * (size_t)m->w + (size_t)i;
}

static int64_t cx(const struct gp_maze *m, int i)
{
	return m->window.x0 + (int64_t)i * m->cell + m->cell / 2;
}

static int64_t cy(const struct gp_maze *m, int j)
{
	return m->window.y0 + (int64_t)j * m->cell + m->cell / 2;
}

int64_t gp_maze_cell_for(struct gp_box window, int64_t fine)
{
	int64_t cell = fine / 3 > 1000 ? fine / 3 : 1000;
	double area = (double)gp_box_width(window) * (double)gp_box_height(window);
	while (area / ((double)cell * (double)cell) > (double)GP_MAZE_MAX_CELLS ||
	       gp_box_width(window) / cell > 4000 ||
	       gp_box_height(window) / cell > 4000)
		cell += cell / 4 + 1;
	return cell;
}

bool gp_maze_fits(struct gp_box window, int64_t cell)
{
	if (cell < 1000 || gp_box_is_empty(window))
		return false;
	int64_t w = (gp_box_width(window) + cell - 1) / cell;
	int64_t h = (gp_box_height(window) + cell - 1) / cell;
	return w >= 2 && h >= 2 && w <= 4096 && h <= 4096 &&
	       (uint64_t)(w * h) <= GP_MAZE_MAX_CELLS;
}

struct gp_maze *gp_maze_create(struct gp_box window, int64_t cell)
{
	if (!gp_maze_fits(window, cell))
		return NULL;
	int64_t w = (gp_box_width(window) + cell - 1) / cell;
	int64_t h = (gp_box_height(window) + cell - 1) / cell;
	struct gp_maze *m = calloc(1, sizeof(*m));
	if (!m)
		return NULL;
	m->window = window;
	m->cell = cell;
	m->w = (int)w;
	m->h = (int)h;
	m->marks = calloc((size_t)(w * h), 1);
	m->flags = calloc((size_t)(w * h), 1);
	m->flags2 = calloc((size_t)(w * h), 1);
	if (!m->marks || !m->flags || !m->flags2) {
		gp_maze_destroy(m);
		return NULL;
	}
	return m;
}

void gp_maze_destroy(struct gp_maze *m)
{
	if (!m)
		return;
	free(m->marks);
	free(m->flags);
	free(m->flags2);
	free(m);
}

/* --- marking ------------------------------------------------------------ */

static void mark_cell(struct gp_maze *m, uint8_t bit, int64_t x, int64_t y)
{
	if (x < m->window.x0 || y < m->window.y0)
		return;
	int64_t i = (x - m->window.x0) / m->cell, j = (y - m->window.y0) / m->cell;
	if (i < m->w && j < m->h)
		m->marks[at(m, (int)i, (int)j)] |= bit;
}

/* Every cell an edge passes through (samples half a cell apart). */
static void mark_edges(struct gp_maze *m, uint8_t bit, const struct gp_ring *r)
{
	for (size_t k = 0; k < r->count; k++) {
		struct gp_point a = r->points[k], b = r->points[(k + 1) % r->count];
		double dx = (double)(b.x - a.x), dy = (double)(b.y - a.y);
		double len = sqrt(dx * dx + dy * dy);
		long n = (long)ceil(len / ((double)m->cell / 2)) + 1;
		for (long s = 0; s <= n; s++) {
			double t = (double)s / (double)n;
			mark_cell(m, bit, a.x + llround(t * dx), a.y + llround(t * dy));
		}
	}
}

static int compare_i64(const void *a, const void *b)
{
	int64_t x = *(const int64_t *)a, y = *(const int64_t *)b;
	return (x > y) - (x < y);
}

/* Cells whose centres are inside (even-odd over all rings). */
static void fill_rows(struct gp_maze *m, uint8_t bit,
		      const struct gp_polygon *p, struct gp_box b)
{
	size_t edges = p->outer.count;
	for (size_t k = 0; k < p->hole_count; k++)
		edges += p->holes[k].count;
	int64_t *xs = malloc((edges + 1) * sizeof(*xs));
	if (!xs)
		return;
	int64_t j0 = (b.y0 - m->window.y0) / m->cell - 1;
	int64_t j1 = (b.y1 - m->window.y0) / m->cell + 1;
	if (j0 < 0)
		j0 = 0;
	if (j1 >= m->h)
		j1 = m->h - 1;
	for (int64_t j = j0; j <= j1; j++) {
		int64_t y = cy(m, (int)j);
		size_t n = 0;
		for (size_t r = 0; r <= p->hole_count; r++) {
			const struct gp_ring *ring = r ? &p->holes[r - 1] : &p->outer;
			for (size_t k = 0; k < ring->count; k++) {
				struct gp_point a = ring->points[k];
				struct gp_point c = ring->points[(k + 1) % ring->count];
				if ((a.y <= y) == (c.y <= y))
					continue;
				double t = (double)(y - a.y) / (double)(c.y - a.y);
				xs[n++] = a.x + llround(t * (double)(c.x - a.x));
			}
		}
		qsort(xs, n, sizeof(*xs), compare_i64);
		for (size_t k = 0; k + 1 < n; k += 2) {
			int64_t i0 = (xs[k] - m->window.x0 - m->cell / 2 + m->cell - 1);
			int64_t i1 = (xs[k + 1] - m->window.x0 - m->cell / 2);
			i0 = i0 < 0 ? 0 : i0 / m->cell;
			if (i1 < 0)
				continue;
			i1 /= m->cell;
			if (i1 >= m->w)
				i1 = m->w - 1;
			for (int64_t i = i0; i <= i1; i++)
				m->marks[at(m, (int)i, (int)j)] |= bit;
		}
	}
	free(xs);
}

void gp_maze_mark_polygon(struct gp_maze *m, enum gp_maze_layer layer,
			  const struct gp_polygon *p)
{
	struct gp_box b = gp_polygon_bounds(p);
	struct gp_box w = m->window;
	if (p->outer.count < 3 || b.x1 < w.x0 || b.x0 > w.x1 || b.y1 < w.y0 ||
	    b.y0 > w.y1)
		return;
	uint8_t bit = (uint8_t)(1u << layer);
	m->used |= bit;
	fill_rows(m, bit, p, b);
	/* ends lie inside their ITO; obstacles are marked where they touch */
	if (layer == GP_MAZE_OWN || layer == GP_MAZE_TARGET ||
	    layer == GP_MAZE_FRAGILE || layer == GP_MAZE_SHADOW)
		return;
	mark_edges(m, bit, &p->outer);
	for (size_t k = 0; k < p->hole_count; k++)
		mark_edges(m, bit, &p->holes[k]);
}

void gp_maze_mark_box(struct gp_maze *m, enum gp_maze_layer layer,
		      struct gp_box box)
{
	struct gp_polygon p;
	gp_polygon_init(&p);
	if (gp_polygon_set_box(&p, box))
		gp_maze_mark_polygon(m, layer, &p);
	gp_polygon_finish(&p);
}

/* --- distance transform ------------------------------------------------ */

#define FAR 1e20f

/* Squared distances in whole cells: exact in int32 for grids up to 4096
 * cells a side; FAR_CELLS where a line holds no mark. */
#define FAR_CELLS INT32_MAX

/* Felzenszwalb and Huttenlocher's lower envelope of parabolas along one
 * row, in integers: breakpoints are kept as fractions (num / den, den >
 * 0) and compared by cross multiplication, so every value is the exact
 * squared distance.  Parabolas of unmarked columns (FAR_CELLS) never
 * reach the envelope. */
static void envelope_row(const int32_t *f, int n, float *d, int *v,
			 int64_t *znum, int64_t *zden)
{
	int k = -1;
	for (int q = 0; q < n; q++) {
		if (f[q] == FAR_CELLS)
			continue;
		int64_t fq = (int64_t)f[q] + (int64_t)q * q, num = 0, den = 1;
		while (k >= 0) {
			int p = v[k];
			num = fq - ((int64_t)f[p] + (int64_t)p * p);
			den = 2 * (int64_t)(q - p);
			if (k == 0 || num * zden[k] > znum[k] * den)
				break;
			k--;
		}
		k++;
		v[k] = q;
		znum[k] = num;
		zden[k] = den;
	}
	if (k < 0) {
		for (int q = 0; q < n; q++)
			d[q] = FAR;
		return;
	}
	int j = 0;
	for (int q = 0; q < n; q++) {
		while (j < k && znum[j + 1] < (int64_t)q * zden[j + 1])
			j++;
		int64_t t = q - v[j];
		d[q] = (float)(t * t + f[v[j]]);
	}
}

/* A rectangle of cells: columns i0 .. i0 + w - 1, rows j0 .. j0 + h - 1. */
struct cellbox {
	int i0, j0, w, h;
};

/* Distance in cells to the nearest mark up or down each column of box,
 * by two sweeps along the rows (kept in row order for the cache),
 * squared, into col (box.w * box.h). */
static void column_distances(const struct gp_maze *m, uint8_t bit,
			     bool invert, struct cellbox box, int32_t *col)
{
	const int32_t none = 1 << 20;   /* more than any grid's height */
	int w = box.w, h = box.h;
	for (int j = 0; j < h; j++) {
		const uint8_t *mk = m->marks + at(m, box.i0, box.j0 + j);
		int32_t *c = col + (size_t)j * (size_t)w;
		const int32_t *up = j ? c - w : NULL;
		for (int i = 0; i < w; i++) {
			bool on = ((mk[i] & bit) != 0) != invert;
			c[i] = on ? 0 : up && up[i] < none ? up[i] + 1 : none;
		}
	}
	for (int j = h - 2; j >= 0; j--) {
		int32_t *c = col + (size_t)j * (size_t)w;
		const int32_t *down = c + w;
		for (int i = 0; i < w; i++)
			if (down[i] + 1 < c[i])
				c[i] = down[i] + 1;
	}
	size_t n = (size_t)w * (size_t)h;
	for (size_t k = 0; k < n; k++)
		col[k] = col[k] >= none ? FAR_CELLS : col[k] * col[k];
}

/* The bounds of the cells with bit set, grown by one cell and kept in
 * the grid; false when there are none. */
static bool marked_bounds(const struct gp_maze *m, uint8_t bit,
			  struct cellbox *box)
{
	int i0 = m->w, i1 = -1, j0 = m->h, j1 = -1;
	for (int j = 0; j < m->h; j++) {
		const uint8_t *mk = m->marks + at(m, 0, j);
		for (int i = 0; i < m->w; i++)
			if (mk[i] & bit) {
				i0 = i < i0 ? i : i0;
				i1 = i > i1 ? i : i1;
				j0 = j < j0 ? j : j0;
				j1 = j;
			}
	}
	if (i1 < 0)
		return false;
	i0 = i0 > 0 ? i0 - 1 : 0;
	j0 = j0 > 0 ? j0 - 1 : 0;
	i1 = i1 + 1 < m->w ? i1 + 1 : i1;
	j1 = j1 + 1 < m->h ? j1 + 1 : j1;
	*box = (struct cellbox){ i0, j0, i1 - i0 + 1, j1 - j0 + 1 };
	return true;
}

/* Squared distance in cells from every cell centre to the nearest cell
 * with bit set (FAR when none), into out (w * h floats).  With invert,
 * to the nearest cell without it: 0 outside the marked cells' bounds,
 * and found within those bounds grown by one cell, as a cell beyond lies
 * no nearer than the unmarked ring round them. */
static bool transform(const struct gp_maze *m, uint8_t bit, bool invert,
		      float *out)
{
	size_t cells = (size_t)m->w * (size_t)m->h;
	struct cellbox box = { 0, 0, m->w, m->h };
	if (invert) {
		for (size_t k = 0; k < cells; k++)
			out[k] = 0;
		if (!marked_bounds(m, bit, &box))
			return true;
	} else if (!(m->used & bit)) {
		for (size_t k = 0; k < cells; k++)
			out[k] = FAR;
		return true;
	}
	int n = box.w > box.h ? box.w : box.h;
	int32_t *col = malloc((size_t)box.w * (size_t)box.h * sizeof(*col));
	int *v = malloc((size_t)n * sizeof(int));
	int64_t *znum = malloc((size_t)(n + 1) * sizeof(int64_t));
	int64_t *zden = malloc((size_t)(n + 1) * sizeof(int64_t));
	bool ok = col && v && znum && zden;
	if (ok) {
		column_distances(m, bit, invert, box, col);
		for (int j = 0; j < box.h; j++)
			envelope_row(col + (size_t)j * (size_t)box.w, box.w,
				     out + at(m, box.i0, box.j0 + j), v, znum,
				     zden);
	}
	free(col);
	free(v);
	free(znum);
	free(zden);
	return ok;
}

/* Squared threshold in cells for keeping `clear` from a layer. */
static float limit2(const struct gp_maze *m, const struct gp_maze_rules *r,
		    int64_t clear)
{
	double t = ((double)clear + (double)r->width / 2) / (double)m->cell + MARGIN;
	return (float)(t * t);
}

/* Sets flag on the cells of layer at least r->end_depth inside it (or,
 * when none is that deep, on its deepest cells). */
static bool deep(struct gp_maze *m, const struct gp_maze_rules *r,
		 enum gp_maze_layer layer, uint8_t flag, float *d)
{
	size_t n = (size_t)m->w * (size_t)m->h;
	uint8_t bit = (uint8_t)(1u << layer);
	if (!(m->used & (1u << GP_MAZE_FRAGILE))) {
		for (size_t k = 0; k < n; k++)
			if (m->marks[k] & bit)
				m->flags2[k] |= flag;
		return true;
	}
	if (!transform(m, bit, true, d))
		return false;
	float most = 0;
	uint8_t both = (uint8_t)(bit | 1u << GP_MAZE_FRAGILE);
	for (size_t k = 0; k < n; k++)
		if ((m->marks[k] & both) == both && d[k] > most)
			most = d[k];
	double want = (double)r->end_depth / (double)m->cell;
	float limit = (float)(want * want);
	if (limit > most)
		limit = most;
	uint8_t fragile = (uint8_t)(1u << GP_MAZE_FRAGILE);
	for (size_t k = 0; k < n; k++)
		if ((m->marks[k] & bit) &&
		    (d[k] >= limit || !(m->marks[k] & fragile)))
			m->flags2[k] |= flag;
	return true;
}

static bool prepare(struct gp_maze *m, const struct gp_maze_rules *r)
{
	size_t n = (size_t)m->w * (size_t)m->h;
	float *same = malloc(n * sizeof(float));
	float *other = malloc(n * sizeof(float));
	bool ok = same && other && transform(m, 1u << GP_MAZE_SAME, false, same) &&
		  transform(m, 1u << GP_MAZE_OTHER, false, other);
	if (!ok)
		goto out;
	memset(m->flags2, 0, n);
	float l_same = limit2(m, r, r->space);
	float l_side = limit2(m, r, r->side_space);
	float l_other = limit2(m, r, r->other);
	float l_soft = limit2(m, r, r->soft_other);
	for (size_t k = 0; k < n; k++) {
		uint8_t mk = m->marks[k], fl = 0;
		if (mk & (1u << GP_MAZE_OWN))
			fl |= F_OWN;
		if (r->to_target && (mk & (1u << GP_MAZE_TARGET)))
			fl |= F_TARGET;
		if (mk & (1u << GP_MAZE_SHADOW))
			fl |= F_SHADOW;
		if (same[k] < l_same || other[k] < l_other)
			fl |= F_BLOCKED;
		else if (other[k] < l_soft)
			fl |= F_SOFT;
		if (same[k] < l_side)
			fl |= F_CLOSED; /* here: not an end on a side */
		m->flags[k] = fl;
	}
	/* patches and where other leads will run: blocked but near the
	 * lead's own ITO */
	if (!(m->used & ((1u << GP_MAZE_PATCH) | (1u << GP_MAZE_SHADOW))))
		goto depth;
	ok = transform(m, 1u << GP_MAZE_PATCH, false, other) &&
	     transform(m, (1u << GP_MAZE_OWN) |
				  (r->to_target ? 1u << GP_MAZE_TARGET : 0),
		       false, same);
	if (!ok)
		goto out;
	double reach = (double)r->patch_reach / (double)m->cell;
	float l_reach = (float)(reach * reach);
	double sreach = (double)r->shadow_reach / (double)m->cell;
	float l_sreach = (float)(sreach * sreach);
	for (size_t k = 0; k < n; k++)
		if ((m->flags[k] & F_SHADOW) && same[k] > l_sreach)
			m->flags[k] |= F_BLOCKED;
	for (size_t k = 0; k < n; k++) {
		if (other[k] >= l_soft)
			continue;
		if (same[k] <= l_reach)
			m->flags[k] |= F_SOFT;
		else if (other[k] < l_other)
			m->flags[k] |= F_BLOCKED;
		else
			m->flags[k] |= F_SOFT;
	}
depth:
	/* where a lead may start and end: deep enough inside its ITO that
	 * notches (which never take a pixel) leave it attached */
	ok = deep(m, r, GP_MAZE_OWN, F_DEEP_OWN, same) &&
	     deep(m, r, GP_MAZE_TARGET, F_DEEP_TARGET, same);
	if (!ok)
		goto out;
	/* the window's edges: the lead stays inside but where it may end */
	int edge = (int)ceil(((double)r->width / 2) / (double)m->cell + MARGIN);
	for (int j = 0; j < m->h; j++)
		for (int i = 0; i < m->w; i++) {
			size_t k = at(m, i, j);
			int d[GP_MAZE_SIDES] = { j, m->w - 1 - i, m->h - 1 - j, i };
			bool near = false, end = false;
			for (int s = 0; s < GP_MAZE_SIDES; s++) {
				if (r->side_cost[s] >= 0 && d[s] == 0)
					end = true;
				else if (d[s] < edge && r->side_cost[s] < 0)
					near = true;
			}
			if (near)
				m->flags[k] |= F_BLOCKED;
			if (end && !(m->flags[k] & (F_BLOCKED | F_CLOSED)))
				m->flags[k] |= F_SIDE;
			m->flags[k] &= (uint8_t)~F_CLOSED;
			if (m->flags[k] & (F_OWN | F_TARGET))
				m->flags[k] &= (uint8_t)~(F_BLOCKED | F_SOFT);
		}
out:
	free(same);
	free(other);
	return ok;
}

/* --- A* ------------------------------------------------------------------- */

struct node {
	uint32_t f;
	uint32_t k;
};

struct heap {
	struct node *a;
	size_t n, cap;
};

static bool heap_push(struct heap *h, uint32_t f, uint32_t k)
{
	if (!gp_array_reserve(h->a, h->cap, h->n + 1))
		return false;
	size_t i = h->n++;
	while (i > 0 && h->a[(i - 1) / 2].f > f) {
		h->a[i] = h->a[(i - 1) / 2];
		i = (i - 1) / 2;
	}
	h->a[i] = (struct node){ f, k };
	return true;
}

static struct node heap_pop(struct heap *h)
{
	struct node top = h->a[0], last = h->a[--h->n];
	size_t i = 0;
	for (;;) {
		size_t c = 2 * i + 1;
		if (c >= h->n)
			break;
		if (c + 1 < h->n && h->a[c + 1].f < h->a[c].f)
			c++;
		if (h->a[c].f >= last.f)
			break;
		h->a[i] = h->a[c];
		i = c;
	}
	if (h->n)
		h->a[i] = last;
	return top;
}

static const int DX[8] = { 1, -1, 0, 0, 1, 1, -1, -1 };
static const int DY[8] = { 0, 0, 1, -1, 1, -1, 1, -1 };

struct search {
	const struct gp_maze *m;
	const struct gp_maze_rules *r;
	int tx0, ty0, tx1, ty1;   /* target cells' bounds */
	bool any_target;
	uint32_t side_cost[GP_MAZE_SIDES];
};

static uint32_t octile(int dx, int dy)
{
	dx = abs(dx);
	dy = abs(dy);
	int lo = dx < dy ? dx : dy, hi = dx < dy ? dy : dx;
	return (uint32_t)lo * DIAG + (uint32_t)(hi - lo) * STEP;
}

static uint32_t heuristic(const struct search *s, int i, int j)
{
	uint32_t best = UINT32_MAX;
	if (s->any_target) {
		int dx = i < s->tx0 ? s->tx0 - i : i > s->tx1 ? i - s->tx1 : 0;
		int dy = j < s->ty0 ? s->ty0 - j : j > s->ty1 ? j - s->ty1 : 0;
		best = octile(dx, dy);
	}
	int d[GP_MAZE_SIDES] = { j, s->m->w - 1 - i, s->m->h - 1 - j, i };
	for (int k = 0; k < GP_MAZE_SIDES; k++) {
		if (s->r->side_cost[k] < 0)
			continue;
		uint32_t v = (uint32_t)d[k] * STEP + s->side_cost[k];
		if (v < best)
			best = v;
	}
	return best == UINT32_MAX ? 0 : best;
}

static bool is_end(const struct gp_maze *m, size_t k)
{
	if (m->flags[k] & F_OWN)
		return false;
	return (m->flags[k] & F_SIDE) ||
	       ((m->flags[k] & F_TARGET) && (m->flags2[k] & F_DEEP_TARGET));
}

/* Extra cost of ending at cell k on a side. */
static uint32_t end_cost(const struct search *s, int i, int j)
{
	const struct gp_maze *m = s->m;
	if (m->flags[at(m, i, j)] & F_TARGET)
		return 0;
	int d[GP_MAZE_SIDES] = { j, m->w - 1 - i, m->h - 1 - j, i };
	uint32_t best = UINT32_MAX;
	for (int k = 0; k < GP_MAZE_SIDES; k++)
		if (s->r->side_cost[k] >= 0 && d[k] == 0 && s->side_cost[k] < best)
			best = s->side_cost[k];
	return best;
}

static bool search(struct gp_maze *m, const struct gp_maze_rules *r,
		   int8_t *dir, uint32_t *g, long *end)
{
	struct search s = { .m = m, .r = r, .tx0 = m->w, .ty0 = m->h,
			    .tx1 = -1, .ty1 = -1 };
	for (int k = 0; k < GP_MAZE_SIDES; k++)
		s.side_cost[k] = r->side_cost[k] < 0
					 ? 0
					 : (uint32_t)((double)r->side_cost[k] /
						      (double)m->cell * STEP);
	struct heap h = { 0 };
	bool ok = true;
	size_t n = (size_t)m->w * (size_t)m->h;
	for (size_t k = 0; k < n; k++) {
		g[k] = UINT32_MAX;
		dir[k] = -1;
		int i = (int)(k % (size_t)m->w), j = (int)(k / (size_t)m->w);
		if ((m->flags[k] & F_TARGET) && !(m->flags[k] & F_OWN)) {
			s.any_target = true;
			s.tx0 = i < s.tx0 ? i : s.tx0;
			s.tx1 = i > s.tx1 ? i : s.tx1;
			s.ty0 = j < s.ty0 ? j : s.ty0;
			s.ty1 = j > s.ty1 ? j : s.ty1;
		}
	}
	for (size_t k = 0; ok && k < n; k++)
		if (m->flags2[k] & F_DEEP_OWN) {
			g[k] = 0;
			ok = heap_push(&h, heuristic(&s, (int)(k % (size_t)m->w),
						     (int)(k / (size_t)m->w)),
				       (uint32_t)k);
		}
	*end = -1;
	uint32_t best = UINT32_MAX;
	while (ok && h.n) {
		struct node top = heap_pop(&h);
		size_t k = top.k;
		if (m->flags[k] & F_CLOSED)
			continue;
		if (top.f >= best)
			break;
		m->flags[k] |= F_CLOSED;
		int i = (int)(k % (size_t)m->w), j = (int)(k / (size_t)m->w);
		if (is_end(m, k)) {
			uint32_t total = g[k] + end_cost(&s, i, j);
			if (total < best) {
				best = total;
				*end = (long)k;
			}
			continue;
		}
		for (int d = 0; d < 8; d++) {
			int a = i + DX[d], b = j + DY[d];
			if (a < 0 || b < 0 || a >= m->w || b >= m->h)
				continue;
			size_t q = at(m, a, b);
			if (m->flags[q] & (F_BLOCKED | F_CLOSED))
				continue;
			uint32_t step = d < 4 ? STEP : DIAG;
			if (m->flags[q] & F_SOFT)
				step += SOFT_COST;
			if ((m->flags[q] & F_SHADOW) && !(m->flags[q] & (F_OWN | F_TARGET)))
				step += SHADOW_COST;
			uint32_t ng = g[k] + step;
			if (ng >= g[q])
				continue;
			g[q] = ng;
			dir[q] = (int8_t)d;
			uint32_t f = ng + (is_end(m, q) ? end_cost(&s, a, b)
							: heuristic(&s, a, b));
			ok = heap_push(&h, f, (uint32_t)q);
		}
	}
	free(h.a);
	return ok;
}

/* --- straightening --------------------------------------------------------- */

struct cellpt {
	int i, j;
};

static bool cell_free(const struct gp_maze *m, int i, int j)
{
	return i >= 0 && j >= 0 && i < m->w && j < m->h &&
	       !(m->flags[at(m, i, j)] & F_BLOCKED);
}

/* a to b along one grid direction, every cell free. */
static bool run_free(const struct gp_maze *m, struct cellpt a, struct cellpt b)
{
	int dx = (b.i > a.i) - (b.i < a.i), dy = (b.j > a.j) - (b.j < a.j);
	for (struct cellpt c = a;; c.i += dx, c.j += dy) {
		if (!cell_free(m, c.i, c.j))
			return false;
		if (c.i == b.i && c.j == b.j)
			return true;
	}
}

/* The elbow joining a and b by two runs (diagonal first when
 * diag_first), or a itself when one run does; false when not free. */
static bool joins(const struct gp_maze *m, struct cellpt a, struct cellpt b,
		  bool diag_first, struct cellpt *elbow)
{
	int dx = b.i - a.i, dy = b.j - a.j;
	int ax = abs(dx), ay = abs(dy);
	if (dx == 0 || dy == 0 || ax == ay) {
		*elbow = a;
		return run_free(m, a, b);
	}
	int d = ax < ay ? ax : ay;
	int sx = dx > 0 ? 1 : -1, sy = dy > 0 ? 1 : -1;
	struct cellpt e = diag_first ? (struct cellpt){ a.i + sx * d, a.j + sy * d }
				     : (struct cellpt){ b.i - sx * d, b.j - sy * d };
	*elbow = e;
	return run_free(m, a, e) && run_free(m, e, b);
}

static bool push_pt(struct gp_maze_path *p, struct gp_point q, size_t *cap)
{
	if (p->count && p->points[p->count - 1].x == q.x &&
	    p->points[p->count - 1].y == q.y)
		return true;
	if (!gp_array_reserve(p->points, (*cap), p->count + 1))
		return false;
	p->points[p->count++] = q;
	return true;
}

/* Three points in a row along one direction: the middle one goes. */
static void drop_straight(struct gp_maze_path *p)
{
	size_t n = 0;
	for (size_t k = 0; k < p->count; k++) {
		if (n >= 2) {
			struct gp_point a = p->points[n - 2], b = p->points[n - 1];
			struct gp_point c = p->points[k];
			int64_t ux = b.x - a.x, uy = b.y - a.y;
			int64_t vx = c.x - b.x, vy = c.y - b.y;
			/* parallel and same way (coordinates < 2^31 cells) */
			if ((double)ux * (double)vy == (double)uy * (double)vx &&
			    (double)ux * (double)vx + (double)uy * (double)vy > 0) {
				p->points[n - 1] = c;
				continue;
			}
		}
		p->points[n++] = p->points[k];
	}
	p->count = n;
}

static bool straighten(const struct gp_maze *m, const struct cellpt *c,
		       size_t n, struct gp_maze_path *out)
{
	size_t cap = 0;
	bool ok = push_pt(out, (struct gp_point){ cx(m, c[0].i), cy(m, c[0].j) },
			  &cap);
	size_t i = 0;
	while (ok && i + 1 < n) {
		size_t best = i + 1;
		struct cellpt elbow = c[i];
		int misses = 0;
		for (size_t j = i + 1; j < n && misses < 8; j++) {
			struct cellpt e;
			if (joins(m, c[i], c[j], true, &e) ||
			    joins(m, c[i], c[j], false, &e)) {
				best = j;
				elbow = e;
				misses = 0;
			} else {
				misses++;
			}
		}
		if (best == i + 1)
			elbow = c[i];
		if (elbow.i != c[i].i || elbow.j != c[i].j)
			ok = push_pt(out, (struct gp_point){ cx(m, elbow.i),
							     cy(m, elbow.j) },
				     &cap);
		ok = ok && push_pt(out, (struct gp_point){ cx(m, c[best].i),
							   cy(m, c[best].j) },
				   &cap);
		i = best;
	}
	if (ok)
		drop_straight(out);
	return ok;
}

void gp_maze_path_finish(struct gp_maze_path *path)
{
	free(path->points);
	memset(path, 0, sizeof(*path));
}

bool gp_maze_route(struct gp_maze *m, const struct gp_maze_rules *r,
		   struct gp_maze_path *out, bool *found)
{
	memset(out, 0, sizeof(*out));
	*found = false;
	size_t n = (size_t)m->w * (size_t)m->h;
	int8_t *dir = malloc(n);
	uint32_t *g = malloc(n * sizeof(*g));
	struct cellpt *cells = NULL;
	long end = -1;
	bool ok = dir && g && prepare(m, r) && search(m, r, dir, g, &end);
	if (!ok || end < 0)
		goto done;
	/* walk back to a source, then keep from the last own cell */
	size_t len = 0;
	for (long k = end;; ) {
		len++;
		if (dir[k] < 0)
			break;
		int d = dir[k];
		int i = (int)(k % m->w) - DX[d], j = (int)(k / m->w) - DY[d];
		k = (long)at(m, i, j);
	}
	cells = malloc(len * sizeof(*cells));
	if (!(ok = cells != NULL))
		goto done;
	size_t idx = len;
	for (long k = end;;) {
		cells[--idx] = (struct cellpt){ (int)(k % m->w), (int)(k / m->w) };
		if (dir[k] < 0)
			break;
		int d = dir[k];
		k = (long)at(m, cells[idx].i - DX[d], cells[idx].j - DY[d]);
	}
	size_t first = 0;
	for (size_t k = 0; k < len; k++)
		if (m->flags2[at(m, cells[k].i, cells[k].j)] & F_DEEP_OWN)
			first = k;
	if (len - first < 2)
		goto done;   /* own and end in one cell: no lead to draw */
	struct cellpt last = cells[len - 1];
	size_t ek = at(m, last.i, last.j);
	out->side = -1;
	if (!(m->flags[ek] & F_TARGET)) {
		int d[GP_MAZE_SIDES] = { last.j, m->w - 1 - last.i,
					 m->h - 1 - last.j, last.i };
		int64_t best = INT64_MAX;
		for (int s = 0; s < GP_MAZE_SIDES; s++)
			if (r->side_cost[s] >= 0 && d[s] == 0 &&
			    r->side_cost[s] < best) {
				best = r->side_cost[s];
				out->side = s;
			}
	}
	ok = straighten(m, cells + first, len - first, out);
	if (ok && out->side >= 0) {
		/* onto the window's side, straight out */
		struct gp_point e = out->points[out->count - 1];
		switch (out->side) {
		case 0: e.y = m->window.y0; break;
		case 1: e.x = m->window.x1; break;
		case 2: e.y = m->window.y1; break;
		default: e.x = m->window.x0; break;
		}
		size_t cap = out->count;
		ok = push_pt(out, e, &cap);
		if (ok)
			drop_straight(out);
	}
	if (ok && out->count >= 2) {
		out->end = out->points[out->count - 1];
		*found = true;
	}
done:
	if (!*found)
		gp_maze_path_finish(out);
	free(cells);
	free(dir);
	free(g);
	return ok;
}
