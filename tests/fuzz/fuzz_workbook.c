/*
 * fuzz_workbook.c - libFuzzer target for the whole pipeline into files: campaign text ->
 * reader -> models -> ledger (fuzz_pipeline.h checks them) -> json_out_write and
 * xlsx_out_write into a private folder made once (mkdtemp under /dev/shm, else TMPDIR or
 * /tmp), emptied after every input and removed at exit.
 *
 * For a ledger the models accepted, both writers must succeed; afterwards the folder holds
 * exactly the two outputs (no staged temporary left); the JSON file is byte for byte what
 * json_out_render gives in memory; the workbook is a zip archive (read here with zlib's
 * raw inflate, following the PKWARE APPNOTE layout: end-of-central-directory record,
 * central directory, local headers) whose every XML part (.xml, .rels, .vml) is valid UTF-8
 * holding only characters XML 1.0 allows (Char production, section 2.2: no C0 controls but
 * tab, LF and CR, no U+FFFE or U+FFFF; issue 16.4), with every & a predefined entity or a
 * character reference to an allowed character, and tags nested well (the start tag names
 * match their end tags, no '<' inside an attribute value, one root element).
 * [Content_Types].xml and xl/workbook.xml must be there.  The workbook is written in
 * libxlsxwriter's in-memory or streaming (constant_memory) mode, chosen by the input's
 * length.  Campaigns of more than 64 runs are skipped to keep one input fast.
 */
#define _XOPEN_SOURCE 700 /* mkdtemp */
#include "fuzz_pipeline.h"
#include "afile.h"
#include "json_out.h"
#include "xlsx_out.h"

#include <dirent.h>
#include <stdio.h>
#include <sys/stat.h>
#include <unistd.h>
#include <zlib.h>

static char dir[256];
static char json_path[300], xlsx_path[300];

static void remove_dir(void)
{
    DIR *d = opendir(dir);
    if (d) {
        struct dirent *de;
        char p[600];
        while ((de = readdir(d)))
            if (strcmp(de->d_name, ".") && strcmp(de->d_name, "..")) {
                snprintf(p, sizeof p, "%s/%s", dir, de->d_name);
                unlink(p);
            }
        closedir(d);
    }
    rmdir(dir);
}

int LLVMFuzzerInitialize(int *argc, char ***argv)
{
    (void)argc;
    (void)argv;
    hl_mem_hook_cjson();
    struct stat sb;
    const char *base = stat("/dev/shm", &sb) == 0 && S_ISDIR(sb.st_mode) && access("/dev/shm", W_OK) == 0
                           ? "/dev/shm"
                           : getenv("TMPDIR") && *getenv("TMPDIR") ? getenv("TMPDIR") : "/tmp";
    snprintf(dir, sizeof dir, "%s/hl-fuzz-workbook-XXXXXX", base);
    if (!mkdtemp(dir)) {
        perror("fuzz_workbook: mkdtemp");
        exit(1);
    }
    snprintf(json_path, sizeof json_path, "%s/ledger.json", dir);
    snprintf(xlsx_path, sizeof xlsx_path, "%s/ledger.xlsx", dir);
    atexit(remove_dir);
    return 0;
}

/* Entries of the folder other than . and ..; aborts if any is not one of the two outputs. */
static int outputs_only(void)
{
    DIR *d = opendir(dir);
    if (!d)
        abort();
    int n = 0;
    struct dirent *de;
    while ((de = readdir(d))) {
        if (!strcmp(de->d_name, ".") || !strcmp(de->d_name, ".."))
            continue;
        if (strcmp(de->d_name, "ledger.json") && strcmp(de->d_name, "ledger.xlsx"))
            abort(); /* a staged temporary or a scratch file left behind */
        n++;
    }
    closedir(d);
    return n;
}

static unsigned char *slurp(const char *path, size_t *len)
{
    FILE *f = fopen(path, "rb");
    if (!f)
        abort();
    size_t cap = 1 << 16, n = 0;
    unsigned char *b = malloc(cap);
    size_t got;
    while (b && (got = fread(b + n, 1, cap - n, f)) > 0) {
        n += got;
        if (n == cap)
            b = realloc(b, cap *= 2);
    }
    fclose(f);
    if (!b)
        abort();
    *len = n;
    return b;
}

static unsigned rd16(const unsigned char *p) { return p[0] | (unsigned)p[1] << 8; }
static unsigned long rd32(const unsigned char *p)
{
    return p[0] | (unsigned long)p[1] << 8 | (unsigned long)p[2] << 16 | (unsigned long)p[3] << 24;
}

/* XML 1.0 Char production (section 2.2). */
static int xml_char(unsigned long c)
{
    return c == 0x9 || c == 0xA || c == 0xD || (c >= 0x20 && c <= 0xD7FF) ||
           (c >= 0xE000 && c <= 0xFFFD) || (c >= 0x10000 && c <= 0x10FFFF);
}

/* Strict UTF-8 (RFC 3629: no overlong forms, no surrogates) of allowed characters. */
static void check_utf8(const unsigned char *s, size_t n)
{
    for (size_t i = 0; i < n;) {
        unsigned long c = s[i];
        int k = c < 0x80 ? 0 : (c & 0xE0) == 0xC0 ? 1 : (c & 0xF0) == 0xE0 ? 2 : (c & 0xF8) == 0xF0 ? 3 : -1;
        if (k < 0 || (k > 0 && i + (size_t)k >= n))
            abort();
        if (k > 0) {
            c &= 0x3Fu >> k;
            for (int j = 1; j <= k; j++) {
                if ((s[i + j] & 0xC0) != 0x80)
                    abort();
                c = c << 6 | (s[i + j] & 0x3F);
            }
            static const unsigned long least[4] = {0, 0x80, 0x800, 0x10000};
            if (c < least[k])
                abort();
        }
        if (!xml_char(c))
            abort();
        i += (size_t)k + 1;
    }
}

/* An entity or character reference at s[i] == '&'; returns the index after its ';'. */
static size_t check_ref(const unsigned char *s, size_t n, size_t i)
{
    static const char *const named[] = {"amp;", "lt;", "gt;", "quot;", "apos;"};
    for (int k = 0; k < 5; k++) {
        size_t m = strlen(named[k]);
        if (i + 1 + m <= n && !memcmp(s + i + 1, named[k], m))
            return i + 1 + m;
    }
    if (i + 2 >= n || s[i + 1] != '#')
        abort();
    size_t j = i + 2;
    int hex = s[j] == 'x';
    j += hex;
    unsigned long c = 0;
    size_t digits = 0;
    for (; j < n && s[j] != ';'; j++, digits++) {
        int d = s[j] >= '0' && s[j] <= '9' ? s[j] - '0'
                : hex && s[j] >= 'a' && s[j] <= 'f' ? s[j] - 'a' + 10
                : hex && s[j] >= 'A' && s[j] <= 'F' ? s[j] - 'A' + 10 : -1;
        if (d < 0 || digits > 8)
            abort();
        c = c * (hex ? 16 : 10) + (unsigned long)d;
    }
    if (j >= n || digits == 0 || !xml_char(c))
        abort();
    return j + 1;
}

static int name_char(unsigned char c)
{
    return c != ' ' && c != '\t' && c != '\n' && c != '\r' && c != '>' && c != '/' && c != '=' &&
           c != '<' && c != '"' && c != '\'';
}

static size_t skip_past(const unsigned char *s, size_t n, size_t i, const char *end)
{
    size_t m = strlen(end);
    for (; i + m <= n; i++)
        if (!memcmp(s + i, end, m))
            return i + m;
    abort();
}

/* Well-formed enough: nesting, quoted attributes, references, one root. */
static void check_xml(const unsigned char *s, size_t n)
{
    enum { DEPTH = 256 };
    size_t at[DEPTH], len[DEPTH];
    int depth = 0, roots = 0;
    check_utf8(s, n);
    for (size_t i = 0; i < n;) {
        if (s[i] == '&') {
            if (depth == 0)
                abort();
            i = check_ref(s, n, i);
            continue;
        }
        if (s[i] != '<') {
            i++;
            continue;
        }
        if (i + 1 < n && s[i + 1] == '?') {
            i = skip_past(s, n, i + 2, "?>");
        } else if (i + 3 < n && !memcmp(s + i, "<!--", 4)) {
            i = skip_past(s, n, i + 4, "-->");
        } else if (i + 8 < n && !memcmp(s + i, "<![CDATA[", 9)) {
            i = skip_past(s, n, i + 9, "]]>");
        } else if (i + 1 < n && s[i + 1] == '/') {
            size_t a = i + 2, b = a;
            while (b < n && name_char(s[b]))
                b++;
            if (depth == 0 || b - a != len[depth - 1] || memcmp(s + a, s + at[depth - 1], b - a))
                abort();
            depth--;
            while (b < n && (s[b] == ' ' || s[b] == '\t' || s[b] == '\n' || s[b] == '\r'))
                b++;
            if (b >= n || s[b] != '>')
                abort();
            i = b + 1;
        } else {
            size_t a = i + 1, b = a;
            while (b < n && name_char(s[b]))
                b++;
            if (b == a)
                abort();
            size_t j = b;
            int empty = 0;
            for (;;) {
                if (j >= n)
                    abort();
                if (s[j] == '"' || s[j] == '\'') {
                    unsigned char q = s[j++];
                    while (j < n && s[j] != q) {
                        if (s[j] == '<')
                            abort();
                        j = s[j] == '&' ? check_ref(s, n, j) : j + 1;
                    }
                    if (j >= n)
                        abort();
                    j++;
                } else if (s[j] == '<') {
                    abort();
                } else if (s[j] == '>') {
                    empty = s[j - 1] == '/';
                    j++;
                    break;
                } else {
                    j++;
                }
            }
            if (!empty) {
                if (depth == DEPTH)
                    abort();
                if (depth == 0)
                    roots++;
                at[depth] = a, len[depth] = b - a, depth++;
            } else if (depth == 0) {
                roots++;
            }
            i = j;
        }
    }
    if (depth != 0 || roots != 1)
        abort();
}

static int ends_with(const char *s, size_t n, const char *ext)
{
    size_t k = strlen(ext);
    return n >= k && !memcmp(s + n - k, ext, k);
}

static void check_workbook(void)
{
    size_t n;
    unsigned char *z = slurp(xlsx_path, &n);
    if (n < 22 || rd32(z) != 0x04034b50UL)
        abort();
    size_t eocd = n - 22; /* libxlsxwriter writes no archive comment; allow one anyway */
    while (eocd > 0 && rd32(z + eocd) != 0x06054b50UL)
        eocd--;
    if (rd32(z + eocd) != 0x06054b50UL)
        abort();
    unsigned entries = rd16(z + eocd + 10);
    unsigned long cd = rd32(z + eocd + 16);
    int have_types = 0, have_book = 0;
    for (unsigned k = 0; k < entries; k++) {
        if (cd + 46 > n || rd32(z + cd) != 0x02014b50UL)
            abort();
        unsigned method = rd16(z + cd + 10);
        unsigned long csize = rd32(z + cd + 20), usize = rd32(z + cd + 24);
        unsigned nlen = rd16(z + cd + 28), xlen = rd16(z + cd + 30), clen = rd16(z + cd + 32);
        unsigned long loc = rd32(z + cd + 42);
        const char *name = (const char *)z + cd + 46;
        if (cd + 46 + nlen > n || loc + 30 > n || rd32(z + loc) != 0x04034b50UL)
            abort();
        have_types |= nlen == 19 && !memcmp(name, "[Content_Types].xml", 19);
        have_book |= nlen == 15 && !memcmp(name, "xl/workbook.xml", 15);
        size_t data = loc + 30 + rd16(z + loc + 26) + rd16(z + loc + 28);
        if (data + csize > n)
            abort();
        if (ends_with(name, nlen, ".xml") || ends_with(name, nlen, ".rels") ||
            ends_with(name, nlen, ".vml")) {
            unsigned char *u = malloc(usize ? usize : 1);
            if (!u)
                abort();
            if (method == 0) {
                if (csize != usize)
                    abort();
                memcpy(u, z + data, usize);
            } else if (method == 8) {
                z_stream zs;
                memset(&zs, 0, sizeof zs);
                if (inflateInit2(&zs, -MAX_WBITS) != Z_OK)
                    abort();
                zs.next_in = z + data;
                zs.avail_in = (uInt)csize;
                zs.next_out = u;
                zs.avail_out = (uInt)usize;
                int r = inflate(&zs, Z_FINISH);
                if (r != Z_STREAM_END || zs.total_out != usize)
                    abort();
                inflateEnd(&zs);
            } else {
                abort();
            }
            check_xml(u, usize);
            free(u);
        }
        cd += 46 + nlen + xlen + clen;
    }
    if (!have_types || !have_book)
        abort();
    free(z);
}

int LLVMFuzzerTestOneInput(const uint8_t *data, size_t size)
{
    struct ledger *l = fuzz_ledger(data, size, 64, (unsigned)(size & 3));
    if (!l)
        return 0;
    struct hl_err e;
    hl_err_clear(&e);
    enum hl_status st = json_out_write(l, json_path, &e);
    if (st != HL_OK && st != HL_ERR_NOMEM)
        abort();
    if (st == HL_OK) {
        char *text = NULL;
        size_t n;
        if (json_out_render(l, &text, &e) == HL_OK) {
            unsigned char *file = slurp(json_path, &n);
            if (n != strlen(text) || memcmp(file, text, n))
                abort(); /* the file sink and the memory sink must agree */
            free(file);
        }
        hl_free(text);
    }
    hl_err_clear(&e);
    st = xlsx_out_write_opt(l, xlsx_path, (size >> 2) & 1, &e);
    if (st != HL_OK && st != HL_ERR_NOMEM)
        abort();
    int files = outputs_only();
    if (st == HL_OK) {
        if (files != 2 - (access(json_path, F_OK) != 0))
            abort();
        check_workbook();
    }
    unlink(json_path);
    unlink(xlsx_path);
    ledger_free(l);
    return 0;
}
