/*
 * isodate.h - plant-local civil date/time as minutes since 1970-01-01T00:00.
 *
 * Campaign times carry no zone (plant local time); all arithmetic is done on
 * an int64 minute count of the proleptic Gregorian calendar, so no libc time
 * zone or locale ever enters the numbers.
 */
#ifndef ISODATE_H
#define ISODATE_H

#include <stdint.h>
#include <stddef.h>

/* The dates every output can write as YYYY-MM-DD: 0001-01-01T00:00 and 9999-12-31T23:59
 * (minutes since the epoch; checked against Python's datetime). A computed date outside
 * them (a repeat, an order-by date) is refused by the campaign reader. */
#define ISODATE_MIN_MIN (-1035593280LL)
#define ISODATE_MAX_MIN 4223371679LL

/* Parse "YYYY-MM-DD" or "YYYY-MM-DDTHH:MM" (optional ":SS" = 00). Validates ranges
 * (year 0001-9999, month 1-12, day in month incl. leap years, hour 0-23, minute 0-59).
 * Returns 0 on success, else -1 and *bad_offset = byte offset of the first wrong character. */
int isodate_parse(const char *s, int64_t *minutes, int *bad_offset);

/* Minutes since epoch from civil parts (no validation). */
int64_t isodate_from_civil(int y, int mo, int d, int h, int mi);
/* Civil parts from minutes since epoch. Any pointer may be NULL. */
void isodate_to_civil(int64_t minutes, int *y, int *mo, int *d, int *h, int *mi);

/* Format as "YYYY-MM-DDTHH:MM" (buf >= 17 bytes) or "YYYY-MM-DD" (date_only, >= 11). */
void isodate_format(int64_t minutes, int date_only, char *buf, size_t n);
/* "YYYY-MM" month key of a time (buf >= 8). */
void isodate_month(int64_t minutes, char *buf, size_t n);
/* Month index y*12 + (mo-1), for grouping without strings. */
int isodate_month_index(int64_t minutes);
/* "YYYY-MM" of a month index (buf >= 16 to hold any int safely). */
void isodate_month_text(int month_index, char *buf, size_t n);

#endif
