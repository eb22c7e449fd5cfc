#include "units.h"

#include <errno.h>
#include <locale.h>
#include <math.h>
#include <pthread.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>

bool gp_parse_mm(const char *text, int64_t *nm, const char **why)
{
	const char *p = text;
	bool negative = false;
	if (*p == '+' || *p == '-')
		negative = *p++ == '-';
	int64_t whole = 0, fraction = 0;
	int whole_digits = 0, fraction_digits = 0;
	for (; *p >= '0' && *p <= '9'; p++, whole_digits++) {
		if (whole > GP_LENGTH_MAX / GP_NM_PER_MM) {
			*why = "is too large (the limit is 10000 mm)";
			return false;
		}
		whole = whole * 10 + (*p - '0');
	}
	if (*p == '.') {
		for (p++; *p >= '0' && *p <= '9'; p++, fraction_digits++) {
			if (fraction_digits == 6) {
				*why = "has more than 6 decimals (1 nm is the "
				       "finest step)";
				return false;
			}
			fraction = fraction * 10 + (*p - '0');
		}
	}
	if (whole_digits + fraction_digits == 0) {
		*why = "is not a length in millimetres (expected a decimal "
		       "number such as 2.54)";
		return false;
	}
	if (*p != '\0') {
		*why = (*p == 'e' || *p == 'E')
			       ? "uses an exponent; write the length as a "
				 "plain decimal in millimetres"
			       : "is not a length in millimetres (expected a "
				 "decimal number such as 2.54)";
		return false;
	}
	for (int i = fraction_digits; i < 6; i++)
		fraction *= 10;
	int64_t value = whole * GP_NM_PER_MM + fraction;
	if (value > GP_LENGTH_MAX) {
		*why = "is too large (the limit is 10000 mm)";
		return false;
	}
	*nm = negative ? -value : value;
	return true;
}

/* [+-] digits [. digits], with at least one digit. */
static bool is_decimal(const char *p)
{
	if (*p == '+' || *p == '-')
		p++;
	int digits = 0;
	for (; *p >= '0' && *p <= '9'; p++)
		digits++;
	if (*p == '.')
		for (p++; *p >= '0' && *p <= '9'; p++)
			digits++;
	return digits > 0 && *p == '\0';
}

/* The C locale, made once: strtod then reads '.' as the decimal point
 * even when the program runs under a locale that writes ','. */
static locale_t c_numeric;
static pthread_once_t c_numeric_once = PTHREAD_ONCE_INIT;

static void make_c_numeric(void)
{
	c_numeric = newlocale(LC_NUMERIC_MASK, "C", (locale_t)0);
}

bool gp_parse_decimal(const char *text, double *out)
{
	if (!is_decimal(text))
		return false;
	pthread_once(&c_numeric_once, make_c_numeric);
	if (!c_numeric)
		return false;
	locale_t before = uselocale(c_numeric);
	char *end;
	errno = 0;
	double value = strtod(text, &end);
	bool ok = *end == '\0' && errno != ERANGE && isfinite(value);
	uselocale(before);
	if (ok)
		*out = value;
	return ok;
}

void gp_format_mm(char *buffer, size_t size, int64_t nm)
{
	/* magnitude as unsigned so that INT64_MIN cannot overflow */
	uint64_t magnitude = nm < 0 ? (uint64_t)0 - (uint64_t)nm : (uint64_t)nm;
	snprintf(buffer, size, "%s%llu.%06llu", nm < 0 ? "-" : "",
		 (unsigned long long)(magnitude / 1000000u),
		 (unsigned long long)(magnitude % 1000000u));
}

void gp_format_mm_short(char *buffer, size_t size, int64_t nm)
{
	gp_format_mm(buffer, size, nm);
	char *dot = strchr(buffer, '.');
	if (!dot)
		return;
	char *end = buffer + strlen(buffer);
	while (end > dot + 1 && end[-1] == '0')
		*--end = '\0';
	if (end == dot + 1)
		*dot = '\0';
}
