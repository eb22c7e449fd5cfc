/* The 'proof' section: how the PDF proof is drawn (lib/write/proof.c),
 * and the sheet sizes it chooses from. */
#include "model.h"

#include <stddef.h>

/* Sheet sizes, portrait, mm: ISO 216 A series and the US sizes of
 * ANSI/ASME Y14.1 (from memory). */
const struct gp_paper gp_papers[] = {
	{ "a4", "A4", 210, 297, 0 },
	{ "a3", "A3", 297, 420, 0 },
	{ "a2", "A2", 420, 594, 0 },
	{ "a1", "A1", 594, 841, 0 },
	{ "a0", "A0", 841, 1189, 0 },
	{ "letter", "Letter", 215.9, 279.4, 1 },
	{ "legal", "Legal", 215.9, 355.6, 1 },
	{ "tabloid", "Tabloid", 279.4, 431.8, 1 },
	{ "ansi-c", "ANSI C", 431.8, 558.8, 1 },
	{ "ansi-d", "ANSI D", 558.8, 863.6, 1 },
	{ "ansi-e", "ANSI E", 863.6, 1117.6, 1 },
};
_Static_assert(sizeof(gp_papers) / sizeof(gp_papers[0]) == GP_PAPER_COUNT,
	       "GP_PAPER_COUNT is the number of sheet sizes");

/* --- the 'proof' section ------------------------------------------------- */

bool gp_proof_read(struct gp_design *design, const struct gp_node *node,
		   struct gp_diag *diag)
{
	static const char *const series[] = { "iso", "us", NULL };
	static const char *const orientations[] = { "any", "portrait",
						    "landscape", NULL };
	const char *paper_keys[GP_PAPER_COUNT + 2];
	paper_keys[0] = "fit";
	for (size_t i = 0; i < GP_PAPER_COUNT; i++)
		paper_keys[i + 1] = gp_papers[i].key;
	paper_keys[GP_PAPER_COUNT + 1] = NULL;

	struct gp_proof_spec *s = &design->proof;
	struct gp_reader r;
	s->where = node->where;
	gp_reader_begin(&r, node, "'proof'", diag);
	gp_read_choice(&r, "paper", false, paper_keys, &s->paper);
	gp_read_choice(&r, "series", false, series, &s->series);
	gp_read_choice(&r, "orientation", false, orientations,
		       &s->orientation);
	gp_read_size(&r, "span_tolerance", false, &s->span_tolerance);
	gp_read_size(&r, "outline_tolerance", false, &s->outline_tolerance);
	gp_read_string(&r, "revision_date", false, &s->revision_date);
	return gp_reader_end(&r);
}
