/*
 * main.c - the haloledger command line.
 *
 *   haloledger check CAMPAIGN [options]            validate, print a per-month summary
 *   haloledger report CAMPAIGN -o OUT.xlsx|OUT.json [-o ...] [options]
 *
 * Only this file decides exit status (design section 6): 0 success, 1 run-time
 * failure, 2 bad usage or bad input, 3 with --strict when the ledger carries
 * warnings.  Nothing is written unless the whole campaign computed cleanly.
 */
#define _XOPEN_SOURCE 700 /* fork, sigaction, strsignal */
#include "afile.h"
#include "campaign.h"
#include "hlmem.h"
#include "isodate.h"
#include "json_out.h"
#include "ledger.h"
#include "reagents.h"
#include "override.h"
#include "sched.h"
#include "sweep.h"
#include "compare.h"
#include "xlsx_out.h"

#include <cjson/cJSON.h>
#include <signal.h>
#include <sys/resource.h>
#include <sys/wait.h>
#include <errno.h>
#include <getopt.h>
#include <stdio.h>
#include <stdlib.h>
#include <string.h>
#include <unistd.h>
#include <xlsxwriter.h>

#define HALOLEDGER_VERSION "0.1.0"
#define MAX_OUTPUTS 4
#define MAX_SCHEDULES 64
/* A catalog is a table of containers (templates/containers.json is about 2 kB); the cap
 * refuses a device or endless pipe early instead of at the campaign's 1 GiB. */
#define CATALOG_MAX_BYTES ((size_t)16 << 20)

extern const char catalog_default_json[]; /* templates/containers.json, compiled in */

enum { EXIT_OK = 0, EXIT_RUNTIME = 1, EXIT_INPUT = 2, EXIT_WARNINGS = 3 };

static const char usage_text[] =
    "Usage: haloledger check CAMPAIGN [--today DATE] [--strict] [--catalog FILE]\n"
    "                        [--schedule FILE.csv ...] [--csv-sep SEP] [--set KEY=VALUE ...]\n"
    "       haloledger report CAMPAIGN -o OUT.xlsx|OUT.json [-o ...] [--today DATE]\n"
    "                         [--strict] [--catalog FILE] [--all-products] [--set KEY=VALUE ...]\n"
    "       haloledger sweep CAMPAIGN --run ID --vary KEY=FROM:TO:STEP|KEY=V1,V2,...\n"
    "                        [--objective max:KEY|min:KEY] [-o OUT.json|OUT.xlsx]\n"
    "       haloledger compare A B [-o OUT.json] [-o OUT.xlsx]   (campaigns or JSON ledgers)\n"
    "       haloledger schedule-template [--example] [-o FILE.csv]\n"
    "       haloledger --help | --version\n"
    "\n"
    "Reads a campaign of free-radical halogenation batches (JSON, see README) and\n"
    "computes each batch's mass balance, vent-scrubber load and caustic use, halogen\n"
    "orders by month and the losses to isomers and over-halogenation.\n"
    "\n"
    "Commands:\n"
    "  check     validate the campaign, run every model, print a per-month summary,\n"
    "            orders, scrubber peaks, warnings and handling cautions; writes nothing\n"
    "  report    as check, then write the ledger: .xlsx workbook and/or .json ledger;\n"
    "            prints the same summary as check once every file is written, then\n"
    "            one 'wrote FILE' line per output\n"
    "  sweep     recompute one run for each value of KEY (reagent_eq, temp_c,\n"
    "            halogen_conversion, feed_h, reactor_mode, overhalogenation_factor):\n"
    "            a table of its products, acid gas, NaOH, containers and scrubber peak,\n"
    "            the best value by --objective (default max:wanted_kg_per_kg_reagent)\n"
    "            and the trade-off in words; -o writes it as JSON or a workbook\n"
    "  compare   what differs between A and B (two campaigns or JSON ledgers): charged\n"
    "            per month and reagent, orders, scrubbers (peak, changeouts, NaOH, hottest\n"
    "            liquor, overload), runs in both or one, warnings that appear or vanish;\n"
    "            -o writes them as JSON and/or a printable workbook (.xlsx)\n"
    "  schedule-template  a CSV header of every run column (with --example, three\n"
    "            filled rows of an invented plant) to FILE.csv or standard output\n"
    "\n"
    "Options:\n"
    "  -o, --output FILE   output file; the extension (.xlsx or .json) picks the format;\n"
    "                      never the campaign or catalog itself, each file at most once\n"
    "      --today DATE    ISO 8601 date; orders whose order-by date has passed are flagged\n"
    "      --strict        exit 3 when the ledger carries warnings (overload, late order,\n"
    "                      flagged variance, unexplained stock...)\n"
    "      --catalog FILE  container catalog to use instead of the built-in one\n"
    "      --schedule FILE CSV schedule: one run a row, the columns named by the run\n"
    "                      keys (substrate_smiles, reagent_eq, ...); after the campaign's\n"
    "                      own runs and \"schedule\" files; may be given several times\n"
    "      --csv-sep SEP   CSV separator: ',' ';' or 'tab' (default: from the header)\n"
    "      --set KEY=VALUE check, report, sweep: a what-if without editing the file;\n"
    "                      KEY a path in the campaign: model.overhalogenation_factor,\n"
    "                      runs.ID.reagent_eq (a runs entry or schedule row by its id; an\n"
    "                      entry with repeat changes in every copy), scrubbers.ID.liquor_kg,\n"
    "                      stock.REAGENT.on_hand_kg, runs[ID.WITH.DOTS].temp_c; VALUE is\n"
    "                      read as JSON (1.2, \"R-3\", {...}); a bare word that is not JSON\n"
    "                      is taken as a string (cstr, 2027-03-02T06:00); null removes the\n"
    "                      key. Checked as the file is; each key once; the ledger lists them\n"
    "      --example       schedule-template: add filled example rows\n"
    "      --all-products  list every product; by default over-halogenated traces below\n"
    "                      report.min_mol_fraction (1e-4) are summed into one row per run\n"
    "  -h, --help          this text\n"
    "  -V, --version       program and library versions\n"
    "\n"
    "Exit status: 0 ok, 1 run-time failure, 2 bad usage or input, 3 warnings with --strict.\n"
    "Environment: SOURCE_DATE_EPOCH fixes the workbook's creation time when the campaign\n"
    "has no \"issued\" date.\n"
    "The figures are planning estimates: check them against the SDS, local regulations\n"
    "and a licensed engineer's review before acting on them.\n";

static void print_err(const char *file, const struct hl_err *e)
{
    if (e->line > 0)
        fprintf(stderr, "haloledger: %s:%d:%d: %s: %s\n", file, e->line, e->col,
                e->field[0] ? e->field : "(file)", e->msg);
    else if (e->field[0])
        fprintf(stderr, "haloledger: %s: %s: %s\n", file, e->field, e->msg);
    else
        fprintf(stderr, "haloledger: %s: %s\n", file, e->msg);
}

/* The file a reader's error refers to: the campaign, or the catalog read with it. */
static const char *err_file(const struct hl_err *e, const char *campaign, const char *catalog)
{
    if (e->file[0])
        return e->file;
    if (e->doc != HL_DOC_CATALOG)
        return campaign;
    return catalog ? catalog : "built-in container catalog (templates/containers.json)";
}

static int exit_for(enum hl_status st)
{
    return st == HL_OK ? EXIT_OK : st == HL_ERR_INPUT ? EXIT_INPUT : EXIT_RUNTIME;
}

static int usage_error(const char *fmt, const char *arg)
{
    fprintf(stderr, "haloledger: ");
    fprintf(stderr, fmt, arg);
    fprintf(stderr, "\nTry 'haloledger --help'.\n");
    return EXIT_INPUT;
}

static int64_t source_date_minutes(void)
{
    const char *s = getenv("SOURCE_DATE_EPOCH");
    if (!s || !*s)
        return -1;
    char *end;
    errno = 0;
    long long v = strtoll(s, &end, 10);
    if (errno || *end || v < 0)
        return -1;
    return (int64_t)(v / 60);
}

/* The month close: only for a month with at least one actual. */
static void print_close(const struct ledger_month *m)
{
    const struct ledger_month_close *k = &m->close;
    if (k->done + k->cancelled == 0)
        return;
    printf("           close: %d done, %d cancelled, %d still planned%s\n", k->done, k->cancelled,
           k->planned, k->closed ? " (closed)" : "");
    for (int r = 0; r < RG_CHARGEABLE; r++)
        if (k->reagent_plan_kg[r] > 0 || k->unexplained_kg[r] != 0)
            printf("           %-7s drawn %.1f kg against %.1f kg planned, unexplained %.1f kg\n",
                   reagent_get(r)->name, k->reagent_actual_kg[r], k->reagent_plan_kg[r],
                   k->unexplained_kg[r]);
    printf("           wanted product %.1f kg against %.1f kg planned; NaOH consumed %.1f kg "
           "against %.1f kg planned\n", k->product_actual_kg, k->product_plan_kg, k->naoh_actual_kg,
           k->naoh_plan_kg);
}

/* The bases a month's scrubbers consumed, as 100 %: "NaOH consumed K kg" for each base used
 * (NaOH alone when none was: the month line always says what the liquors took). */
static void base_text(const struct ledger_month *m, char *out, size_t n)
{
    size_t len = 0;
    out[0] = '\0';
    for (int r = RG_CHARGEABLE; r < RG_COUNT && len < n; r++)
        if (reagent_get(r)->kind == RK_BASE && m->base_kg[r] > 0)
            len += (size_t)snprintf(out + len, n - len, "%s%s consumed %.1f kg", len ? ", " : "",
                                    reagent_get(r)->name, m->base_kg[r]);
    if (len == 0)
        snprintf(out, n, "%s consumed %.1f kg", reagent_get(RG_NAOH)->name, m->naoh_kg);
}

/* One route of a month (substrate, reagent, wanted product): its runs, wanted kg and yield. */
static void print_route(const struct ledger_month_product *p)
{
    printf("           %s + %s -> %s: %d run%s, wanted %.1f kg, yield %.1f %%\n",
           p->substrate_name ? p->substrate_name : p->substrate, reagent_get(p->reagent)->name,
           p->wanted_formula[0] ? p->wanted_formula : "(no wanted product)", p->runs,
           p->runs == 1 ? "" : "s", p->wanted_kg, p->yield_pct);
}

static void print_summary(const struct ledger *l)
{
    char month[16], when[20];
    printf("%s%s%s: %d runs\n", l->title ? l->title : "(untitled campaign)", l->site ? ", " : "",
           l->site ? l->site : "", l->nruns);
    for (int i = 0; i < l->noverrides; i++)
        printf("  what-if: --set %s (not the campaign file as written)\n", l->overrides[i]);
    for (int i = 0; i < l->nmonths; i++) {
        const struct ledger_month *m = &l->months[i];
        isodate_month_text(m->month_index, month, sizeof month);
        double acid = 0;
        for (int v = 0; v < VS_COUNT; v++)
            acid += m->vent_kg[v];
        /* unlike products are not one quantity: several routes get a line each below */
        char routes[40] = "";
        if (m->nproducts > 1)
            snprintf(routes, sizeof routes, " (%d routes)", m->nproducts);
        char bases[160];
        base_text(m, bases, sizeof bases);
        printf("  %s  runs %d  wanted product%s %.1f kg%s  isomers %.1f kg  over-halogenated %.1f kg"
               "  gas to scrubber %.1f kg  %s  changeouts %d\n",
               month, m->runs, m->nproducts > 1 ? "s" : "", m->product_kg, routes, m->isomer_kg,
               m->overhal_kg, acid, bases, m->changeouts);
        for (int k = 0; m->nproducts > 1 && k < m->nproducts; k++)
            print_route(&m->products[k]);
        for (int r = 0; r < RG_CHARGEABLE; r++)
            if (m->reagents_kg[r] > 0)
                printf("           %-7s %.1f kg charged\n", reagent_get(r)->name, m->reagents_kg[r]);
        if (m->reagents_kg[RG_NAOH] > 0)
            printf("           caustic make-up bought for changeouts %.1f kg (as purchased solution)\n",
                   m->reagents_kg[RG_NAOH]);
        for (int r = RG_CHARGEABLE; r < RG_COUNT; r++) /* the other bases */
            if (r != RG_NAOH && m->reagents_kg[r] > 0)
                printf("           %s make-up bought for changeouts %.1f kg (as bought)\n",
                       reagent_get(r)->name, m->reagents_kg[r]);
        if (m->co2_kg > 0)
            printf("           CO2 given off by the scrubber liquors %.1f kg\n", m->co2_kg);
        print_close(m);
    }
    for (int i = 0; i < l->nstock_checks; i++) {
        const struct ledger_stock_check *k = &l->stock_checks[i];
        isodate_format(k->date_min, 0, when, sizeof when);
        printf("  stock check %s %s: book %.1f kg, counted %.1f kg, unexplained %.1f kg%s\n",
               reagent_get(k->reagent)->name, when, k->book_kg, k->counted_kg, k->unexplained_kg,
               k->flagged ? " (FLAGGED)" : "");
    }
    for (int i = 0; i < l->nscrubbers; i++) {
        const struct ledger_scrubber *s = &l->scrubbers[i];
        isodate_format(s->out.peak_at_min, 0, when, sizeof when);
        char used[80] = "water liquor, no base";
        if (s->base >= 0)
            snprintf(used, sizeof used, "%s consumed %.1f kg", reagent_get(s->base)->name, s->out.base_kg);
        printf("  scrubber %s: hourly peak %.3f kmol/h in the hour from %s (rated %.3f)%s, "
               "%d changeouts, %s\n",
               s->id, s->out.peak_acid_kmol_h, when, s->rated_acid_kmol_h,
               s->out.overloaded ? " OVERLOADED" : "", s->out.changeouts, used);
        if (s->out.npeak_heat_runs > 0) {
            isodate_format(s->out.peak_heat_at_min, 0, when, sizeof when);
            printf("    peak heat release %.1f kW from %s (run%s", s->out.peak_heat_kw, when,
                   s->out.npeak_heat_runs == 1 ? "" : "s");
            for (int k = 0; k < s->out.npeak_heat_runs; k++)
                printf("%s %s", k ? "," : "", l->runs[s->out.peak_heat_runs[k]].id);
            printf(")\n");
        }
    }
    for (int i = 0; i < l->norders; i++) {
        const struct ord_line *o = &l->orders[i];
        if (o->containers <= 0)
            continue;
        isodate_month_text(o->month_index, month, sizeof month);
        isodate_format(o->order_by_min, 1, when, sizeof when);
        printf("  order %s %s: %d x %s by %s%s\n", month, reagent_get(o->item)->name, o->containers,
               o->container ? o->container : "?", when, o->late ? " (LATE)" : "");
    }
    if (l->cautions_mask) {
        printf("Cautions:\n");
        for (int c = 0; c < CA_COUNT; c++)
            if (l->cautions_mask & (1u << c))
                printf("  - %s\n", caution_get(c)->short_form);
        printf("  %s\n", caution_deferral());
    }
}

static int has_ext(const char *path, const char *ext)
{
    size_t n = strlen(path), k = strlen(ext);
    return n > k && !strcmp(path + n - k, ext);
}

/* A library line on the writer's stderr: "[ERROR] ..." or "[WARNING] ..." (libxlsxwriter
 * prints them itself). Our own message says the same with the user's file name. */
static int library_line(const char *line)
{
    return !strncmp(line, "[ERROR]", 7) || !strncmp(line, "[WARNING]", 9);
}

static void relay_line(const char *ln, char *lib, size_t libsize)
{
    if (!library_line(ln))
        fprintf(stderr, "%s\n", ln);
    else if (!lib[0])
        snprintf(lib, libsize, "%s", ln);
}

/* Copy the child's stderr to ours until it closes, holding back the library's own lines;
 * the first of them is kept in lib (for a writer that succeeded despite a warning). */
static void relay_stderr(int fd, char *lib, size_t libsize)
{
    char line[4096];
    size_t n = 0;
    lib[0] = '\0';
    for (;;) {
        ssize_t got = read(fd, line + n, sizeof line - 1 - n);
        if (got < 0 && errno == EINTR)
            continue;
        if (got <= 0)
            break;
        n += (size_t)got;
        char *from = line, *nl;
        while ((nl = memchr(from, '\n', (size_t)(line + n - from)))) {
            *nl = '\0';
            relay_line(from, lib, libsize);
            from = nl + 1;
        }
        n -= (size_t)(from - line);
        memmove(line, from, n);
        if (n == sizeof line - 1) { /* a line longer than the buffer is passed on in pieces */
            fwrite(line, 1, n, stderr);
            n = 0;
        }
    }
    if (n > 0) { /* a last line without its newline */
        line[n] = '\0';
        relay_line(line, lib, libsize);
    }
}

/*
 * Each writer runs in a forked child.  libxlsxwriter does not check every allocation: under
 * an address-space limit it can die of a segmentation fault (issue 16.7), which no status
 * value can report.  Contained in a child, such a death becomes an exit-1 message here, the
 * staged files are removed and the targets stay as they were, whatever the writers become.
 * The child's stderr passes through a pipe so the library's raw "[ERROR]" lines are not
 * shown beside our message; its result (struct hl_err) comes back through a second pipe.
 */
static enum hl_status write_isolated(const struct ledger *l, const char *staged, int xlsx,
                                     const char *output, struct hl_err *e, char *lib,
                                     size_t libsize)
{
    int errp[2] = {-1, -1}, resp[2] = {-1, -1};
    lib[0] = '\0';
    fflush(NULL); /* the child must not flush our buffered output a second time */
    if (pipe(errp) != 0 || pipe(resp) != 0) {
        int err = errno;
        for (int i = 0; i < 2; i++) {
            if (errp[i] >= 0)
                close(errp[i]);
            if (resp[i] >= 0)
                close(resp[i]);
        }
        return hl_err_set(e, HL_ERR_IO, "cannot write %s: cannot start the writer: %s", output,
                          strerror(err));
    }
    pid_t pid = (pid_t)afile_fork_writer();
    if (pid < 0) {
        int err = errno;
        close(errp[0]), close(errp[1]), close(resp[0]), close(resp[1]);
        return hl_err_set(e, err == ENOMEM || err == EAGAIN ? HL_ERR_NOMEM : HL_ERR_IO,
                          "cannot write %s: cannot start the writer: %s", output, strerror(err));
    }
    if (pid == 0) {
        struct rlimit no_core = {0, 0};
        setrlimit(RLIMIT_CORE, &no_core); /* a contained crash leaves no core file */
        close(errp[0]);
        close(resp[0]);
        if (dup2(errp[1], STDERR_FILENO) < 0)
            _exit(1);
        close(errp[1]);
        struct hl_err ce;
        hl_err_clear(&ce);
        ce.status = xlsx ? xlsx_out_write(l, staged, &ce) : json_out_write(l, staged, &ce);
        ssize_t w = write(resp[1], &ce, sizeof ce);
        /* exit, not _exit: leak checkers (LeakSanitizer, valgrind) judge the writer here */
        exit(w == (ssize_t)sizeof ce ? 0 : 1);
    }
    close(errp[1]);
    close(resp[1]);
    relay_stderr(errp[0], lib, libsize);
    close(errp[0]);
    struct hl_err ce;
    size_t got = 0;
    while (got < sizeof ce) {
        ssize_t r = read(resp[0], (char *)&ce + got, sizeof ce - got);
        if (r < 0 && errno == EINTR)
            continue;
        if (r <= 0)
            break;
        got += (size_t)r;
    }
    close(resp[0]);
    int ws = 0;
    while (waitpid(pid, &ws, 0) < 0 && errno == EINTR)
        ;
    afile_writer_done();
    if (WIFEXITED(ws) && WEXITSTATUS(ws) == 0 && got == sizeof ce) {
        *e = ce;
        return ce.status;
    }
    if (WIFSIGNALED(ws)) {
        int sig = WTERMSIG(ws);
        int memory = sig == SIGSEGV || sig == SIGBUS || sig == SIGABRT || sig == SIGKILL;
        return hl_err_set(e, HL_ERR_IO, "cannot write %s: the %s writer was stopped by signal %d (%s)%s",
                          output, xlsx ? "workbook" : "JSON", sig, strsignal(sig),
                          memory ? "; memory is probably exhausted (libxlsxwriter does not "
                                   "check all of its allocations): allow more memory or split "
                                   "the campaign" : "");
    }
    return hl_err_set(e, HL_ERR_IO, "cannot write %s: the %s writer ended without a result (exit status %d)",
                      output, xlsx ? "workbook" : "JSON", WIFEXITED(ws) ? WEXITSTATUS(ws) : -1);
}

/* Remove temporaries of our naming left in the folder of path by a process that is gone
 * (an earlier run that was killed, or a writer child that crashed). */
static int sweep_folder_of(const char *path)
{
    char *dir = NULL;
    if (afile_dirname(path, &dir, NULL) != HL_OK)
        return 0;
    int n = afile_sweep(dir);
    hl_free(dir);
    return n;
}

/* Write every output or none: each is rendered to a staged file next to its target,
 * and only when all are complete are they renamed into place. A failure removes the
 * staged files and leaves every existing target as it was. */
static int write_outputs(const struct ledger *l, const char *const *outputs, int nout)
{
    char *staged[MAX_OUTPUTS] = {NULL};
    char lib[512];
    struct hl_err e;
    enum hl_status st = HL_OK;
    int i, failed = -1;
    for (i = 0; i < nout; i++) {
        int old = sweep_folder_of(outputs[i]);
        if (old > 0)
            fprintf(stderr, "haloledger: note: removed %d temporary file%s of an interrupted "
                            "earlier run beside %s\n", old, old > 1 ? "s" : "", outputs[i]);
    }
    for (i = 0; i < nout; i++) {
        hl_err_clear(&e);
        if (!(st = afile_check_target(outputs[i], &e)) &&
            !(st = afile_tmpname(outputs[i], &staged[i], &e)))
            st = write_isolated(l, staged[i], has_ext(outputs[i], ".xlsx"), outputs[i], &e, lib,
                                sizeof lib);
        if (!st && lib[0])
            fprintf(stderr, "haloledger: warning: %s: libxlsxwriter said: %s\n", outputs[i], lib);
        if (st) {
            failed = i;
            break;
        }
    }
    for (i = 0; i < nout && !st; i++)
        if ((st = afile_commit(staged[i], outputs[i], &e)))
            failed = i;
    char *staged_name = st && staged[failed] ? hl_strdup(staged[failed]) : NULL;
    for (i = 0; i < nout; i++) {
        if (st && staged[i])
            afile_discard(staged[i]);
        hl_free(staged[i]);
    }
    if (st) {
        for (i = 0; i <= failed; i++)
            sweep_folder_of(outputs[i]); /* what a crashed writer child left */
        /* the writers' messages name the staged file: show the output the user asked for */
        char *at = staged_name ? strstr(e.msg, staged_name) : NULL;
        if (at)
            fprintf(stderr, "haloledger: %.*s%s%s\n", (int)(at - e.msg), e.msg, outputs[failed],
                    at + strlen(staged_name));
        else
            fprintf(stderr, "haloledger: %s\n", e.msg);
        hl_free(staged_name);
        return exit_for(st);
    }
    return EXIT_OK;
}

/* Standard output and error are checked like any other output (a full disk or a closed
 * pipe must not pass as success): exit 1 with a message when a byte was lost. */
static int finish(int rc)
{
    if (fflush(stdout) != 0 || ferror(stdout)) {
        int err = errno;
        fprintf(stderr, "haloledger: cannot write standard output: %s\n",
                err ? strerror(err) : "write error");
        rc = EXIT_RUNTIME;
    }
    /* a warning or message that could not be shown is a failure too (nothing to tell it to) */
    if ((fflush(stderr) != 0 || ferror(stderr)) && rc != EXIT_INPUT)
        rc = EXIT_RUNTIME;
    return rc;
}

/* Bad usage: an output that is an input, or two outputs that are one file. Writing
 * over the campaign would destroy it, and one file written twice keeps only the last. */
static int outputs_clash(const char *const *outputs, int nout, const char *campaign,
                         const char *catalog)
{
    for (int i = 0; i < nout; i++) {
        if (afile_same(outputs[i], campaign))
            return usage_error("output '%s' is the campaign file itself; choose another name",
                               outputs[i]);
        if (catalog && afile_same(outputs[i], catalog))
            return usage_error("output '%s' is the --catalog file itself; choose another name",
                               outputs[i]);
        for (int j = 0; j < i; j++)
            if (afile_same(outputs[i], outputs[j])) {
                fprintf(stderr, "haloledger: outputs '%s' and '%s' are the same file\n"
                                "Try 'haloledger --help'.\n", outputs[j], outputs[i]);
                return EXIT_INPUT;
            }
    }
    return EXIT_OK;
}

/* The JSON ledger of path: the file itself when it is one, else the ledger of the campaign
 * (written to a staged temporary file by the JSON writer and read back). NULL after a
 * message on stderr; *rc the exit status. */
static cJSON *ledger_tree(const char *path, const char *catalog, const struct ledger_opts *lo, int *rc)
{
    struct hl_err e;
    hl_err_clear(&e);
    char *text = NULL;
    enum hl_status st = afile_read(path, &text, NULL, &e);
    if (st) {
        print_err(path, &e);
        *rc = exit_for(st);
        return NULL;
    }
    cJSON *t = cJSON_Parse(text);
    const cJSON *f = t ? cJSON_GetObjectItemCaseSensitive(t, "format") : NULL;
    hl_free(text);
    if (cJSON_IsString(f) && !strcmp(f->valuestring, "haloledger-ledger/1"))
        return t;
    cJSON_Delete(t);
    struct campaign *c = NULL;
    struct ledger *l = NULL;
    char *tmp = NULL;
    if ((st = camp_load(path, catalog, &c, &e)) || (st = ledger_build(c, lo, &l, &e))) {
        print_err(err_file(&e, path, NULL), &e);
        camp_free(c);
        *rc = exit_for(st);
        return NULL;
    }
    camp_free(c);
    const char *dir = getenv("TMPDIR");
    char target[512];
    snprintf(target, sizeof target, "%s/haloledger-compare.json", dir && *dir ? dir : "/tmp");
    if (!(st = afile_tmpname(target, &tmp, &e)) && !(st = json_out_write(l, tmp, &e)))
        st = afile_read(tmp, &text, NULL, &e);
    ledger_free(l);
    if (tmp) {
        afile_discard(tmp);
        hl_free(tmp);
    }
    if (st) {
        fprintf(stderr, "haloledger: %s\n", e.msg);
        *rc = exit_for(st);
        return NULL;
    }
    t = cJSON_Parse(text);
    hl_free(text);
    if (!t) {
        fprintf(stderr, "haloledger: out of memory reading the ledger of %s\n", path);
        *rc = EXIT_RUNTIME;
    }
    return t;
}

/* Every compare output or none: each staged beside its target (the JSON text, or the
 * workbook written straight to the staged name), all renamed into place at the end. */
static enum hl_status compare_outputs(const struct cmp_result *r, const char *a, const char *b,
                                      const char *const *outputs, int nout, struct hl_err *e)
{
    char *staged[MAX_OUTPUTS] = {NULL};
    char *text = NULL;
    enum hl_status st = HL_OK;
    int i, failed = -1;
    for (i = 0; i < nout && !st; i++) {
        char *dir = NULL;
        failed = i;
        if ((st = afile_check_target(outputs[i], e)) || (st = afile_tmpname(outputs[i], &staged[i], e)))
            break;
        if (has_ext(outputs[i], ".xlsx")) {
            if (!(st = afile_dirname(outputs[i], &dir, e)))
                st = cmp_write_xlsx(r, a, b, staged[i], dir, e);
            hl_free(dir);
            continue;
        }
        if (!text) {
            cJSON *j = cmp_to_json(r, a, b);
            text = j ? cJSON_Print(j) : NULL;
            cJSON_Delete(j);
        }
        st = text ? afile_write(staged[i], text, strlen(text), e) : hl_err_set(e, HL_ERR_NOMEM, "out of memory");
    }
    cJSON_free(text);
    for (i = 0; i < nout && !st; i++)
        if ((st = afile_commit(staged[i], outputs[i], e)))
            failed = i;
    /* the messages name the staged file: show the output the user asked for */
    char *at = st && staged[failed] ? strstr(e->msg, staged[failed]) : NULL;
    if (at) {
        char msg[sizeof e->msg];
        snprintf(msg, sizeof msg, "%.*s%s%s", (int)(at - e->msg), e->msg, outputs[failed],
                 at + strlen(staged[failed]));
        memcpy(e->msg, msg, sizeof msg);
    }
    for (i = 0; i < nout; i++) {
        if (st && staged[i])
            afile_discard(staged[i]);
        hl_free(staged[i]);
    }
    return st;
}

/* haloledger compare A B [-o OUT.json] [-o OUT.xlsx]: the differences as text, and as JSON
 * or a workbook with -o. */
static int do_compare(int argc, char **argv, const char *const *outputs, int nout, const char *catalog_path,
                      const char *today_text)
{
    if (argc - optind != 2)
        return usage_error("%s", "compare needs two files: A B");
    for (int i = 0; i < nout; i++) {
        if (!has_ext(outputs[i], ".json") && !has_ext(outputs[i], ".xlsx"))
            return usage_error("compare writes -o OUT.json or -o OUT.xlsx (not '%s')", outputs[i]);
        if (afile_same(outputs[i], argv[optind]) || afile_same(outputs[i], argv[optind + 1]))
            return usage_error("output '%s' is one of the files compared", outputs[i]);
    }
    int rc = outputs_clash(outputs, nout, argv[optind], catalog_path);
    if (rc != EXIT_OK)
        return rc;
    struct ledger_opts lo = {.today_min = -1, .created_min = 0};
    int bad;
    if (today_text && isodate_parse(today_text, &lo.today_min, &bad))
        return usage_error("--today: '%s' is not an ISO 8601 date (YYYY-MM-DD)", today_text);
    char *catalog = NULL;
    struct hl_err e;
    hl_err_clear(&e);
    enum hl_status st;
    if (catalog_path && (st = afile_read_max(catalog_path, CATALOG_MAX_BYTES, &catalog, NULL, &e))) {
        print_err(catalog_path, &e);
        return exit_for(st);
    }
    const char *cat = catalog ? catalog : catalog_default_json;
    cJSON *a = ledger_tree(argv[optind], cat, &lo, &rc);
    cJSON *b = a ? ledger_tree(argv[optind + 1], cat, &lo, &rc) : NULL;
    hl_free(catalog);
    if (!a || !b) {
        cJSON_Delete(a);
        return rc;
    }
    struct cmp_result r;
    st = cmp_ledgers(a, b, &r, &e);
    cJSON_Delete(a);
    cJSON_Delete(b);
    if (st) {
        fprintf(stderr, "haloledger: %s\n", e.msg);
        return exit_for(st);
    }
    if (nout > 0 && (st = compare_outputs(&r, argv[optind], argv[optind + 1], outputs, nout, &e))) {
        fprintf(stderr, "haloledger: %s\n", e.msg);
        cmp_free(&r);
        return exit_for(st);
    }
    printf("A: %s\nB: %s\n", argv[optind], argv[optind + 1]);
    if (!r.n)
        printf("no differences\n");
    for (int i = 0; i < r.n; i++)
        printf("  %-28s %-24s %s -> %s\n", r.d[i].where, r.d[i].what, r.d[i].a, r.d[i].b);
    if (r.n)
        printf("%d difference%s\n", r.n, r.n == 1 ? "" : "s");
    for (int i = 0; i < nout; i++)
        printf("wrote %s\n", outputs[i]);
    cmp_free(&r);
    return EXIT_OK;
}

/* haloledger schedule-template [--example] [-o FILE.csv]: the CSV header (and examples). */
static int schedule_template(int argc, char **argv, const char *const *outputs, int nout, int example)
{
    if (optind < argc)
        return usage_error("unexpected argument '%s'", argv[optind]);
    if (nout > 1)
        return usage_error("%s", "schedule-template writes one file");
    if (nout == 1 && !has_ext(outputs[0], ".csv"))
        return usage_error("output '%s' must end in .csv", outputs[0]);
    struct hl_err e;
    hl_err_clear(&e);
    char *text = NULL;
    enum hl_status st = sched_template(example, &text, &e);
    if (!st && nout == 1 && !(st = afile_check_target(outputs[0], &e)))
        st = afile_write(outputs[0], text, strlen(text), &e);
    if (st) {
        fprintf(stderr, "haloledger: %s\n", e.msg);
        hl_free(text);
        return exit_for(st);
    }
    if (nout == 1)
        printf("wrote %s\n", outputs[0]);
    else
        fputs(text, stdout);
    hl_free(text);
    return EXIT_OK;
}

/* haloledger sweep: the table on standard output, and each -o file. */
static int do_sweep(struct campaign *c, const struct ledger_opts *lo, const char *run_id,
                    const char *vary, const char *objective, const char *const *outputs, int nout,
                    const struct ovr_list *sets)
{
    const char *eq = strchr(vary, '=');
    if (!eq || eq == vary)
        return usage_error("--vary: '%s' is not KEY=FROM:TO:STEP", vary);
    char key[64];
    snprintf(key, sizeof key, "%.*s", (int)(eq - vary) < 63 ? (int)(eq - vary) : 63, vary);
    struct hl_err e;
    hl_err_clear(&e);
    char **values = NULL;
    int nv = 0;
    enum hl_status st = sweep_values(eq + 1, &values, &nv, &e);
    struct sweep *s = NULL;
    if (!st)
        st = sweep_run(c, lo, run_id, key, values, nv, objective, &s, &e);
    for (int i = 0; i < nv; i++)
        hl_free(values[i]);
    hl_free(values);
    ovr_blame(sets, &e);
    if (st) {
        if (e.line > 0 || e.file[0])
            print_err(err_file(&e, c->file, NULL), &e);
        else if (e.field[0])
            fprintf(stderr, "haloledger: --vary %s: %s\n", e.field, e.msg);
        else
            fprintf(stderr, "haloledger: %s\n", e.msg);
        return exit_for(st);
    }
    for (int i = 0; i < nout && !st; i++)
        st = has_ext(outputs[i], ".xlsx") ? sweep_write_xlsx(s, outputs[i], &e)
                                          : sweep_write_json(s, outputs[i], &e);
    if (st) {
        fprintf(stderr, "haloledger: %s\n", e.msg);
        sweep_free(s);
        return exit_for(st);
    }
    for (int i = 0; i < c->nsets; i++)
        printf("what-if: --set %s (not the campaign file as written)\n", c->sets[i]);
    sweep_print(s, stdout);
    for (int i = 0; i < nout; i++)
        printf("wrote %s\n", outputs[i]);
    sweep_free(s);
    return EXIT_OK;
}

/* Read the catalog (catalog_path, else the built-in one) and the campaign with the
 * --set values parsed into *sets (ovr_free it; empty on failure too; co->sets is sets or
 * NULL); EXIT_OK, or the exit status after a message. */
static int load_campaign(const char *campaign_path, const char *catalog_path, const struct camp_opts *co,
                         const char *const *set_args, int nset, struct ovr_list *sets, struct campaign **c)
{
    struct hl_err e;
    hl_err_clear(&e);
    enum hl_status st;
    char *catalog = NULL;
    if ((st = ovr_parse(set_args, nset, sets, &e)) ||
        (catalog_path && (st = afile_read_max(catalog_path, CATALOG_MAX_BYTES, &catalog, NULL, &e)))) {
        print_err(e.file[0] ? e.file : catalog_path, &e);
        ovr_free(sets);
        return exit_for(st);
    }
    st = camp_load_opts(campaign_path, catalog ? catalog : catalog_default_json, co, c, &e);
    hl_free(catalog);
    if (st) {
        print_err(err_file(&e, campaign_path, catalog_path), &e);
        ovr_free(sets);
        return exit_for(st);
    }
    return EXIT_OK;
}

static void print_warnings(const struct ledger *l)
{
    for (int i = 0; i < l->nwarnings; i++) {
        const struct ledger_warning *w = &l->warnings[i];
        if (w->run)
            fprintf(stderr, "haloledger: warning: run %s: %s\n", w->run, w->message);
        else
            fprintf(stderr, "haloledger: warning: %s\n", w->message);
    }
}

/* The options of the command line (getopt_long: before or after the command). */
struct cli {
    const char *set_args[OVR_MAX];
    int nset;
    const char *schedules[MAX_SCHEDULES];
    int nsched, example;
    char csv_sep;
    const char *sweep_run_id, *vary, *objective;
    const char *outputs[MAX_OUTPUTS];
    int nout, strict, all_products;
    const char *catalog_path, *today_text;
};

#define CLI_GO_ON (-1)

/* Read the options into *o (pointers into argv). Returns CLI_GO_ON, or the exit status when
 * the run ends here: --help and --version (0), a bad option (2, message printed). */
static int read_options(int argc, char **argv, struct cli *o)
{
    static const struct option opts[] = {
        {"output", required_argument, NULL, 'o'}, {"today", required_argument, NULL, 't'},
        {"strict", no_argument, NULL, 's'},        {"catalog", required_argument, NULL, 'c'},
        {"help", no_argument, NULL, 'h'},          {"version", no_argument, NULL, 'V'},
        {"all-products", no_argument, NULL, 'a'},
        {"schedule", required_argument, NULL, 'S'}, {"csv-sep", required_argument, NULL, 'p'},
        {"example", no_argument, NULL, 'x'},
        {"run", required_argument, NULL, 'r'}, {"vary", required_argument, NULL, 'v'},
        {"objective", required_argument, NULL, 'j'},
        {"set", required_argument, NULL, 'e'},
        {NULL, 0, NULL, 0}};
    int ch;
    memset(o, 0, sizeof *o);
    opterr = 0; /* our own messages, in our own format */
    /* GNU getopt permutes, so options may come before or after the command; "--" ends them. */
    while ((ch = getopt_long(argc, argv, ":o:hV", opts, NULL)) != -1) {
        switch (ch) {
        case 'o':
            if (o->nout == MAX_OUTPUTS)
                return usage_error("at most %s outputs", "4");
            o->outputs[o->nout++] = optarg;
            break;
        case 't': o->today_text = optarg; break;
        case 's': o->strict = 1; break;
        case 'a': o->all_products = 1; break;
        case 'c': o->catalog_path = optarg; break;
        case 'S':
            if (o->nsched == MAX_SCHEDULES)
                return usage_error("at most %s --schedule files", "64");
            o->schedules[o->nsched++] = optarg;
            break;
        case 'p':
            if (!strcmp(optarg, ",") || !strcmp(optarg, ";") || !strcmp(optarg, "\t"))
                o->csv_sep = optarg[0];
            else if (!strcmp(optarg, "tab"))
                o->csv_sep = '\t';
            else
                return usage_error("--csv-sep: '%s' is not ',' ';' or 'tab'", optarg);
            break;
        case 'x': o->example = 1; break;
        case 'r': o->sweep_run_id = optarg; break;
        case 'v': o->vary = optarg; break;
        case 'j': o->objective = optarg; break;
        case 'e':
            if (o->nset == OVR_MAX)
                return usage_error("at most %s --set options", "64");
            o->set_args[o->nset++] = optarg;
            break;
        case 'h': fputs(usage_text, stdout); return EXIT_OK;
        case 'V':
            printf("haloledger %s (libxlsxwriter %s, cJSON %s)\n", HALOLEDGER_VERSION, LXW_VERSION,
                   cJSON_Version());
            return EXIT_OK;
        case ':': return usage_error("option %s needs a value", argv[optind - 1]);
        default: return usage_error("unknown option '%s'", argv[optind - 1]);
        }
    }
    return CLI_GO_ON;
}

static int run(int argc, char **argv)
{
    struct cli o;
    hl_mem_hook_cjson();
    int rc = read_options(argc, argv, &o);
    if (rc != CLI_GO_ON)
        return rc;
    if (optind >= argc)
        return usage_error("%s", "missing command: check or report");
    const char *cmd = argv[optind++];
    if (o.nset && (!strcmp(cmd, "compare") || !strcmp(cmd, "schedule-template")))
        return usage_error("--set belongs to check, report and sweep (%s: write the what-if's "
                           "ledger with report --set -o and compare that)", cmd);
    if (!strcmp(cmd, "compare"))
        return do_compare(argc, argv, o.outputs, o.nout, o.catalog_path, o.today_text);
    if (!strcmp(cmd, "schedule-template"))
        return schedule_template(argc, argv, o.outputs, o.nout, o.example);
    int report = !strcmp(cmd, "report"), sweep = !strcmp(cmd, "sweep");
    if (sweep) {
        if (!o.sweep_run_id || !o.vary)
            return usage_error("%s", "sweep needs --run ID and --vary KEY=FROM:TO:STEP");
        report = o.nout > 0;
    } else if (o.sweep_run_id || o.vary || o.objective)
        return usage_error("%s", "--run, --vary and --objective belong to sweep");
    if (!report && !sweep && strcmp(cmd, "check"))
        return usage_error("unknown command '%s' (expected check, report, sweep, compare or schedule-template)", cmd);
    if (optind >= argc)
        return usage_error("%s: missing CAMPAIGN file", cmd);
    const char *campaign_path = argv[optind++];
    if (optind < argc)
        return usage_error("unexpected argument '%s'", argv[optind]);
    if (report && o.nout == 0 && !sweep)
        return usage_error("%s", "report needs -o OUT.xlsx or -o OUT.json");
    if (!report && !sweep && o.nout > 0)
        return usage_error("%s", "check writes nothing; use report -o");
    for (int i = 0; i < o.nout; i++)
        if (!has_ext(o.outputs[i], ".xlsx") && !has_ext(o.outputs[i], ".json"))
            return usage_error("output '%s' must end in .xlsx or .json", o.outputs[i]);
    rc = outputs_clash(o.outputs, o.nout, campaign_path, o.catalog_path);
    if (rc != EXIT_OK)
        return rc;

    struct ledger_opts lo = {.today_min = -1, .created_min = source_date_minutes(),
                             .all_products = o.all_products};
    if (o.today_text) {
        int bad;
        if (isodate_parse(o.today_text, &lo.today_min, &bad))
            return usage_error("--today: '%s' is not an ISO 8601 date (YYYY-MM-DD)", o.today_text);
    }

    struct campaign *c = NULL;
    for (int i = 0; i < o.nout; i++)
        for (int j = 0; j < o.nsched; j++)
            if (afile_same(o.outputs[i], o.schedules[j]))
                return usage_error("output '%s' is a --schedule file; choose another name", o.outputs[i]);
    struct ovr_list sets;
    struct camp_opts co = {o.schedules, o.nsched, o.csv_sep, o.nset ? &sets : NULL};
    if ((rc = load_campaign(campaign_path, o.catalog_path, &co, o.set_args, o.nset, &sets, &c)) != EXIT_OK)
        return rc;
    struct hl_err e;
    hl_err_clear(&e);
    enum hl_status st;
    if (sweep) {
        rc = do_sweep(c, &lo, o.sweep_run_id, o.vary, o.objective, o.outputs, o.nout, &sets);
        camp_free(c);
        ovr_free(&sets);
        return rc;
    }
    struct ledger *l = NULL;
    st = ledger_build_consuming(c, &lo, &l, &e); /* the runs are freed once balanced */
    camp_free(c);
    ovr_blame(&sets, &e); /* a model's error in a --set value (a SMILES) names the --set */
    ovr_free(&sets);
    if (st) {
        print_err(err_file(&e, campaign_path, o.catalog_path), &e);
        return exit_for(st);
    }
    print_warnings(l);
    /* report writes first and prints after: a reader that stops early (| head) cannot
     * keep the ledger from being written */
    if (report)
        rc = write_outputs(l, o.outputs, o.nout);
    if (rc == EXIT_OK) {
        print_summary(l);
        for (int i = 0; i < o.nout; i++)
            printf("wrote %s\n", o.outputs[i]);
    }
    if (rc == EXIT_OK && o.strict && l->nwarnings > 0)
        rc = EXIT_WARNINGS;
    ledger_free(l);
    return rc;
}

int main(int argc, char **argv)
{
    afile_guard_signals();
    int rc = finish(run(argc, argv));
    afile_discard_all(); /* nothing staged survives an exit path that did not commit it */
    return rc;
}
