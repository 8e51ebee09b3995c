/*
 * isodate.c - ISO 8601 calendar dates as minute counts (see isodate.h).
 *
 * days_from_civil / civil_from_days are the era-based algorithms published by
 * H. Hinnant, "chrono-Compatible Low-Level Date Algorithms" (2013): exact for
 * the proleptic Gregorian calendar over the whole int range.
 */
#include "isodate.h"

#include <stdio.h>

/* Days from 1970-01-01 to y-m-d, proleptic Gregorian (Hinnant's algorithm, above). */
static int64_t days_from_civil(int64_t y, int m, int d)
{
    y -= m <= 2;
    int64_t era = (y >= 0 ? y : y - 399) / 400;
    int64_t yoe = y - era * 400;
    int64_t doy = (153 * (m + (m > 2 ? -3 : 9)) + 2) / 5 + d - 1;
    int64_t doe = yoe * 365 + yoe / 4 - yoe / 100 + doy;
    return era * 146097 + doe - 719468;
}

/* The date *y-*m-*d that is z days from 1970-01-01 (Hinnant's algorithm, above). */
static void civil_from_days(int64_t z, int *y, int *m, int *d)
{
    z += 719468;
    int64_t era = (z >= 0 ? z : z - 146096) / 146097;
    int64_t doe = z - era * 146097;
    int64_t yoe = (doe - doe / 1460 + doe / 36524 - doe / 146096) / 365;
    int64_t doy = doe - (365 * yoe + yoe / 4 - yoe / 100);
    int64_t mp = (5 * doy + 2) / 153;
    int dd = (int)(doy - (153 * mp + 2) / 5 + 1);
    int mm = (int)(mp < 10 ? mp + 3 : mp - 9);
    *y = (int)(yoe + era * 400 + (mm <= 2));
    *m = mm;
    *d = dd;
}

/* Days in month m (1..12) of year y, Gregorian leap years. */
static int days_in_month(int y, int m)
{
    static const int dm[12] = {31, 28, 31, 30, 31, 30, 31, 31, 30, 31, 30, 31};
    if (m == 2 && ((y % 4 == 0 && y % 100 != 0) || y % 400 == 0))
        return 29;
    return dm[m - 1];
}

/* Read exactly n digits at s+*i; -1 on failure (offset left at the bad char). */
static int digits(const char *s, int *i, int n)
{
    int v = 0;
    for (int k = 0; k < n; k++) {
        char c = s[*i];
        if (c < '0' || c > '9')
            return -1;
        v = v * 10 + (c - '0');
        (*i)++;
    }
    return v;
}

int isodate_parse(const char *s, int64_t *minutes, int *bad_offset)
{
    int i = 0, y, mo, d, h = 0, mi = 0, at;
#define FAIL(off) do { if (bad_offset) *bad_offset = (off); return -1; } while (0)
    if ((y = digits(s, &i, 4)) < 0) FAIL(i);
    if (y == 0) FAIL(0); /* year 0000 (1 BC) has no place in a plant schedule */
    if (s[i] != '-') FAIL(i);
    i++;
    at = i;
    if ((mo = digits(s, &i, 2)) < 0) FAIL(i);
    if (mo < 1 || mo > 12) FAIL(at);
    if (s[i] != '-') FAIL(i);
    i++;
    at = i;
    if ((d = digits(s, &i, 2)) < 0) FAIL(i);
    if (d < 1 || d > days_in_month(y, mo)) FAIL(at);
    if (s[i] == 'T') {
        i++;
        at = i;
        if ((h = digits(s, &i, 2)) < 0) FAIL(i);
        if (h > 23) FAIL(at);
        if (s[i] != ':') FAIL(i);
        i++;
        at = i;
        if ((mi = digits(s, &i, 2)) < 0) FAIL(i);
        if (mi > 59) FAIL(at);
        if (s[i] == ':') {
            i++;
            at = i;
            int sec = digits(s, &i, 2);
            if (sec < 0) FAIL(i);
            if (sec != 0) FAIL(at); /* minute resolution: seconds must be 00 */
        }
    }
    if (s[i] != '\0') FAIL(i);
#undef FAIL
    *minutes = isodate_from_civil(y, mo, d, h, mi);
    return 0;
}

int64_t isodate_from_civil(int y, int mo, int d, int h, int mi)
{
    return days_from_civil(y, mo, d) * 1440 + h * 60 + mi;
}

void isodate_to_civil(int64_t minutes, int *y, int *mo, int *d, int *h, int *mi)
{
    int64_t days = minutes >= 0 ? minutes / 1440 : -((-minutes + 1439) / 1440);
    int64_t rem = minutes - days * 1440;
    int yy, mm, dd;
    civil_from_days(days, &yy, &mm, &dd);
    if (y) *y = yy;
    if (mo) *mo = mm;
    if (d) *d = dd;
    if (h) *h = (int)(rem / 60);
    if (mi) *mi = (int)(rem % 60);
}

void isodate_format(int64_t minutes, int date_only, char *buf, size_t n)
{
    int y, mo, d, h, mi;
    isodate_to_civil(minutes, &y, &mo, &d, &h, &mi);
    if (date_only)
        snprintf(buf, n, "%04d-%02d-%02d", y, mo, d);
    else
        snprintf(buf, n, "%04d-%02d-%02dT%02d:%02d", y, mo, d, h, mi);
}

void isodate_month(int64_t minutes, char *buf, size_t n)
{
    int y, mo;
    isodate_to_civil(minutes, &y, &mo, NULL, NULL, NULL);
    snprintf(buf, n, "%04d-%02d", y, mo);
}

int isodate_month_index(int64_t minutes)
{
    int y, mo;
    isodate_to_civil(minutes, &y, &mo, NULL, NULL, NULL);
    return y * 12 + (mo - 1);
}

void isodate_month_text(int month_index, char *buf, size_t n)
{
    int y = month_index >= 0 ? month_index / 12 : -((-month_index + 11) / 12);
    snprintf(buf, n, "%04d-%02d", y, month_index - y * 12 + 1);
}
