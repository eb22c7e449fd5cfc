/* Exact lengths: decimal millimetres <-> integer nanometres. */
#ifndef GP_UNITS_H
#define GP_UNITS_H

#include <stdbool.h>
#include <stddef.h>
#include <stdint.h>

#define GP_NM_PER_MM INT64_C(1000000)
/* Largest length accepted anywhere: 10 m (1e13 nm).  Overflow is ruled
 * out by construction: sums of a few lengths stay far inside int64_t
 * (9.2e18); a count times a length is bounded by the count limits
 * (GP_MAX_CELLS x GP_LENGTH_MAX = 1e18, checked at compile time in
 * matrix.c); a product of two lengths (areas, cross products) may reach
 * 1e26 and is therefore only ever computed in double or __int128, never
 * in int64_t.  gp_add_nm/gp_mul_nm below check anything else. */
#define GP_LENGTH_MAX (INT64_C(10000) * GP_NM_PER_MM)

/* Parse a decimal millimetre value ("12.5", "-0.000001", "+3") straight to
 * nanometres without floating point.  At most 6 decimals; no exponent; no
 * spaces; |value| <= GP_LENGTH_MAX.  On failure returns false and sets
 * *why to a static text saying what is wrong. */
bool gp_parse_mm(const char *text, int64_t *nm, const char **why);

/* The one grammar for every other number in a description: an optional
 * sign, digits, an optional point and digits, at least one digit; no
 * spaces, no hex, no exponent, no "inf" or "nan".  The value is read as
 * in the C locale whatever the program's locale.  False, leaving *out
 * untouched, when text is not such a number or is beyond a double. */
bool gp_parse_decimal(const char *text, double *out);

/* Write nm as millimetres with exactly 6 decimals ("-1.250000"). */
void gp_format_mm(char *buffer, size_t size, int64_t nm);
/* Write nm as millimetres with trailing zeros removed ("1.25", "3"). */
void gp_format_mm_short(char *buffer, size_t size, int64_t nm);

static inline double gp_mm(int64_t nm) { return (double)nm / 1e6; }

/* Checked arithmetic: false on overflow. */
static inline bool gp_add_nm(int64_t a, int64_t b, int64_t *out)
{
	return !__builtin_add_overflow(a, b, out);
}
static inline bool gp_mul_nm(int64_t a, int64_t b, int64_t *out)
{
	return !__builtin_mul_overflow(a, b, out);
}

#endif
