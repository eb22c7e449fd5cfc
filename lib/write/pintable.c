/* The pin table and the pin matrix, named with the description's names
 * (pintable.h). */
#include "pintable.h"

#include "digits.h"
#include "escape.h"
#include "route.h"

#include <ctype.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>

static void upper(const char *name, char *out, size_t size)
{
	size_t n = 0;
	for (; name[n] && n + 1 < size; n++)
		out[n] = (char)toupper((unsigned char)name[n]);
	out[n] = '\0';
}

static int colon_count(const struct gp_digit_row *row)
{
	int count = 0;
	for (size_t i = 0; i < row->unit_count; i++)
		for (int k = 0; k < row->units[i].part_count; k++)
			count += strcmp(row->units[i].parts[k].name, "colon") == 0;
	return count;
}

static void digit_label(const struct gp_build *build,
			const struct gp_pixel *px, char *out, size_t size)
{
	const struct gp_design *d = build->design;
	snprintf(out, size, "?");
	if (px->owner < 0 || (size_t)px->owner >= build->digit_row_count)
		return;
	const struct gp_digit_row *row = &build->digit_rows[px->owner];
	if (px->d < 0 || (size_t)px->d >= row->unit_count)
		return;
	const struct gp_digit_unit *u = &row->units[px->d];
	if (px->b < 0 || px->b >= u->part_count)
		return;
	const char *name = u->parts[px->b].name;
	char part[16], prefix[160] = "";
	if (d->digit_count > 1)
		snprintf(prefix, sizeof(prefix), "%s:",
			 d->digits[px->owner].name);
	upper(name, part, sizeof(part));
	if (strcmp(name, "colon") == 0 && colon_count(row) <= 1)
		snprintf(out, size, "%sCOL", prefix);
	else if (strcmp(name, "colon") == 0)
		snprintf(out, size, "%s%dCOL", prefix, u->number);
	else if (u->number == 0)
		snprintf(out, size, "%s%s", prefix, part);
	else
		snprintf(out, size, "%s%d%s", prefix, u->number, part);
}

void gp_pixel_label(const struct gp_build *build, const struct gp_pixel *px,
		    char *out, size_t size)
{
	const struct gp_design *d = build->design;
	switch (px->owner_kind) {
	case GP_OWNER_BLOCK: {
		const struct gp_block *b = &d->blocks[px->owner];
		long row = (long)px->a * b->dots_down + px->c + 1;
		long col = (long)px->b * b->dots_across + px->d + 1;
		if (d->block_count > 1)
			snprintf(out, size, "%s:R%ldC%ld", b->name, row, col);
		else
			snprintf(out, size, "R%ldC%ld", row, col);
		return;
	}
	case GP_OWNER_DIGITS:
		digit_label(build, px, out, size);
		return;
	case GP_OWNER_ICON:
		snprintf(out, size, "%s", d->icons[px->owner].name);
		return;
	}
	snprintf(out, size, "?");
}

/* Appends word to a space-separated list unless it is there already. */
static void add_word(struct gp_buffer *list, const char *word)
{
	size_t length = strlen(word);
	const char *data = list->data ? list->data : "";
	for (const char *p = data; *p;) {
		size_t n = strcspn(p, " ");
		if (n == length && strncmp(p, word, n) == 0)
			return;
		p += n + (p[n] == ' ');
	}
	if (list->size)
		gp_buffer_puts(list, " ");
	gp_buffer_puts(list, word);
}

static void block_phrase(const struct gp_build *build,
			 const struct gp_pixel *px, bool common,
			 struct gp_buffer *out)
{
	const struct gp_block *b = &build->design->blocks[px->owner];
	if (common)
		gp_buffer_printf(out, "block %s line %d row %d", b->name,
				 px->a + 1, px->c + 1);
	else if (b->share_segments || b->lines == 1)
		gp_buffer_printf(out, "block %s cell %d column %d", b->name,
				 px->b + 1, px->d + 1);
	else
		gp_buffer_printf(out, "block %s line %d cell %d column %d",
				 b->name, px->a + 1, px->b + 1, px->d + 1);
}

void gp_net_drives(const struct gp_build *build, int net,
		   struct gp_buffer *out)
{
	const struct gp_artwork *art = &build->art;
	const struct gp_design *d = build->design;
	if (net < 0 || (size_t)net >= art->net_count)
		return;
	bool common = art->nets[net].kind == GP_NET_COMMON;
	/* one phrase per block, one per digit row, one for all icons, in
	 * the order of their first pixel */
	size_t groups = d->block_count + d->digit_count + 1;
	struct gp_buffer *words = calloc(groups, sizeof(*words));
	long *first = malloc(groups * sizeof(*first));
	if (!words || !first) {
		out->failed = true;
		goto out;
	}
	for (size_t g = 0; g < groups; g++)
		first[g] = -1;
	for (size_t i = 0; i < art->pixel_count; i++) {
		const struct gp_pixel *px = &art->pixels[i];
		if (px->common != net && px->segment != net)
			continue;
		size_t g = px->owner_kind == GP_OWNER_BLOCK ? (size_t)px->owner :
			   px->owner_kind == GP_OWNER_DIGITS ?
				   d->block_count + (size_t)px->owner :
				   groups - 1;
		if (g >= groups)
			continue;
		if (first[g] < 0) {
			first[g] = (long)i;
			if (px->owner_kind == GP_OWNER_BLOCK)
				block_phrase(build, px, common, &words[g]);
		}
		if (px->owner_kind != GP_OWNER_BLOCK) {
			char label[192];
			gp_pixel_label(build, px, label, sizeof(label));
			add_word(&words[g], label);
		}
	}
	bool any = false;
	for (;;) {
		long best = -1;
		size_t pick = 0;
		for (size_t g = 0; g < groups; g++)
			if (first[g] >= 0 && (best < 0 || first[g] < best))
				best = first[g], pick = g;
		if (best < 0)
			break;
		first[pick] = -1;
		if (any)
			gp_buffer_puts(out, "; ");
		any = true;
		const struct gp_pixel *px = &art->pixels[best];
		if (px->owner_kind == GP_OWNER_DIGITS)
			gp_buffer_printf(out, "digits %s ",
					 d->digits[px->owner].name);
		else if (px->owner_kind == GP_OWNER_ICON)
			gp_buffer_puts(out, strchr(words[pick].data, ' ') ?
						    "icons " :
						    "icon ");
		gp_buffer_append(out, words[pick].data, words[pick].size);
	}
out:
	for (size_t g = 0; words && g < groups; g++)
		gp_buffer_finish(&words[g]);
	free(words);
	free(first);
}

static int compare_pins(const void *a, const void *b)
{
	const struct gp_pin *x = *(const struct gp_pin *const *)a;
	const struct gp_pin *y = *(const struct gp_pin *const *)b;
	return (x->number > y->number) - (x->number < y->number);
}

const struct gp_pin **gp_pins_in_order(const struct gp_build *build)
{
	const struct gp_pin **list =
		malloc((build->pin_count ? build->pin_count : 1) *
		       sizeof(*list));
	if (!list)
		return NULL;
	for (size_t i = 0; i < build->pin_count; i++)
		list[i] = &build->pins[i];
	qsort(list, build->pin_count, sizeof(*list), compare_pins);
	return list;
}

bool gp_pin_matrix_init(struct gp_pin_matrix *m, const struct gp_build *build)
{
	const struct gp_artwork *art = &build->art;
	memset(m, 0, sizeof(*m));
	m->rows = build->pin_count;
	m->commons = (size_t)(art->common_count > 0 ? art->common_count : 0);
	m->pins = gp_pins_in_order(build);
	size_t cells = m->rows * m->commons;
	m->cells = calloc(cells ? cells : 1,
			  sizeof(*m->cells));
	/* rows of each net, chained: a net may have more than one pad */
	long *head = malloc((art->net_count ? art->net_count : 1) *
			    sizeof(*head));
	long *next = malloc((m->rows ? m->rows : 1) * sizeof(*next));
	bool ok = m->pins && m->cells && head && next;
	for (size_t i = 0; ok && i < art->net_count; i++)
		head[i] = -1;
	for (size_t r = m->rows; ok && r-- > 0;) {
		int net = m->pins[r]->net;
		next[r] = -1;
		if (net < 0 || (size_t)net >= art->net_count)
			continue;
		next[r] = head[net];
		head[net] = (long)r;
		const struct gp_net *n = &art->nets[net];
		if (n->kind == GP_NET_COMMON && n->number >= 1 &&
		    (size_t)n->number <= m->commons)
			gp_buffer_puts(&m->cells[r * m->commons +
						 (size_t)n->number - 1],
				       n->name);
	}
	for (size_t i = 0; ok && i < art->pixel_count; i++) {
		const struct gp_pixel *px = &art->pixels[i];
		if (px->segment < 0 || px->common < 0)
			continue;
		int k = art->nets[px->common].number - 1;
		if (k < 0 || (size_t)k >= m->commons)
			continue;
		char label[192];
		gp_pixel_label(build, px, label, sizeof(label));
		for (long r = head[px->segment]; r >= 0; r = next[r])
			add_word(&m->cells[(size_t)r * m->commons + (size_t)k],
				 label);
	}
	for (size_t i = 0; ok && i < m->rows * m->commons; i++)
		ok = !m->cells[i].failed;
	free(head);
	free(next);
	if (!ok)
		gp_pin_matrix_finish(m);
	return ok;
}

void gp_pin_matrix_finish(struct gp_pin_matrix *m)
{
	for (size_t i = 0; m->cells && i < m->rows * m->commons; i++)
		gp_buffer_finish(&m->cells[i]);
	free(m->cells);
	free(m->pins);
	memset(m, 0, sizeof(*m));
}

const char *gp_pin_matrix_cell(const struct gp_pin_matrix *m, size_t row,
			       size_t common)
{
	const struct gp_buffer *b = &m->cells[row * m->commons + common];
	return b->data ? b->data : "";
}

bool gp_pin_matrix_csv(const struct gp_build *build, struct gp_buffer *out)
{
	struct gp_pin_matrix m;
	if (!gp_pin_matrix_init(&m, build))
		return false;
	gp_buffer_puts(out, "pin,net");
	for (size_t k = 0; k < m.commons; k++)
		gp_buffer_printf(out, ",COM%zu", k + 1);
	gp_buffer_puts(out, "\r\n");
	for (size_t r = 0; r < m.rows; r++) {
		const struct gp_pin *p = m.pins[r];
		gp_buffer_printf(out, "%d,", p->number);
		gp_escape_csv(out, p->net >= 0 ? build->art.nets[p->net].name
					       : "NC");
		for (size_t k = 0; k < m.commons; k++) {
			gp_buffer_puts(out, ",");
			gp_escape_csv(out, gp_pin_matrix_cell(&m, r, k));
		}
		gp_buffer_puts(out, "\r\n");
	}
	gp_pin_matrix_finish(&m);
	return !out->failed;
}
