/* report_html.c — the one-file HTML report: page frame and style sheet, shared rows, and the page of `solve`. */
/*
 * SPDX-License-Identifier: GPL-3.0-or-later
 *
 * The page is polyglot XHTML (well-formed XML that browsers read as HTML):
 * inline CSS and inline SVG, no script, no external resource, no entity
 * other than the five of XML, so `xmllint --noout` accepts it and it opens
 * the same anywhere, also printed.
 */
#include "report_html_internal.h"
#include "report_internal.h"
#include "svg_internal.h"

#include <math.h>
#include <stdio.h>
#include <stdlib.h>

static const char style[] =
    "body{font-family:'DejaVu Sans',Arial,Helvetica,sans-serif;color:#1a1a1a;background:#ffffff;"
    "max-width:1080px;margin:0 auto;padding:20px 24px;line-height:1.45}\n"
    "h1{font-size:1.55em;margin:0 0 4px}\n"
    "h2{font-size:1.2em;border-bottom:1px solid #bbbbbb;padding-bottom:3px;margin:26px 0 8px}\n"
    ".sub{color:#404040;margin:0 0 14px}\n"
    ".safety{border:2px solid #1a1a1a;background:#f2f2f2;padding:10px 14px;font-weight:bold}\n"
    ".verdict{font-size:1.12em;padding:10px 14px;border-left:8px solid #0072b2;background:#eef5fa}\n"
    ".verdict.failed{border-left-color:#d55e00;background:#fbefe6}\n"
    "table{border-collapse:collapse;margin:6px 0 10px}\n"
    "th,td{border:1px solid #bbbbbb;padding:3px 8px;text-align:left;vertical-align:top}\n"
    "th{background:#f5f5f5;font-weight:normal}\n"
    "td.num{font-family:'DejaVu Sans Mono',monospace}\n"
    ".proof{display:inline-block;padding:0 6px;border:1px solid #555555;border-radius:3px;"
    "font-size:.85em;white-space:nowrap}\n"
    ".proof.exact{background:#dff0e8}.proof.interval{background:#e2eef8}"
    ".proof.none{background:#fbe9dc}\n"
    ".gate-failed{font-weight:bold;text-decoration:underline}\n"
    "figure{margin:18px 0;break-inside:avoid;page-break-inside:avoid}\n"
    "figure svg{max-width:100%;height:auto;border:1px solid #dddddd}\n"
    "figcaption{font-size:.9em;color:#333333;max-width:900px;margin-top:4px}\n"
    "footer{margin-top:30px;font-size:.85em;color:#555555}\n"
    "@media print{body{max-width:none;padding:0;font-size:10pt}"
    "h2{break-after:avoid;page-break-after:avoid}"
    "*{-webkit-print-color-adjust:exact;print-color-adjust:exact}"
    "figure svg{border:none}@page{margin:14mm}}\n";

static const char safety[] =
    "What is proven here holds for the model as written: its states, transitions and "
    "rewards. It is not a proof about the physical system the model describes. Whether a "
    "machine run by this policy or agent is safe is for the codes and standards that apply "
    "to it and for qualified, licensed practitioners to decide.";

void bc__html_text(FILE *f, const char *s)
{
    bc__xml_text(f, s);
}

void bc__html_open(FILE *f, const char *command, const char *name)
{
    fputs("<!DOCTYPE html>\n<html xmlns=\"http://www.w3.org/1999/xhtml\" lang=\"en\">\n<head>\n"
          "<meta charset=\"utf-8\"/>\n<meta name=\"viewport\" content=\"width=device-width\"/>\n"
          "<title>bellcheck ", f);
    bc__xml_text(f, command);
    fputs(": ", f);
    bc__xml_text(f, name);
    fprintf(f, "</title>\n<style>\n%s</style>\n</head>\n<body>\n<header>\n<h1>bellcheck %s: ",
            style, command);
    bc__xml_text(f, name);
    fputs("</h1>\n", f);
}

void bc__html_safety(FILE *f)
{
    fprintf(f, "</header>\n<p class=\"safety\">%s</p>\n", safety);
}

void bc__html_begin(FILE *f, const char *command, const bc_model *m)
{
    bc__html_open(f, command, m->name);
    int32_t terminal = 0;
    for (int32_t s = 0; s < m->n_states; s++)
        terminal += m->terminal[s];
    char *g = bc_num_text(m->discount_exact, m->big);
    fprintf(f, "<p class=\"sub\">%d state%s (%d terminal), %d action%s, %lld state-action "
               "pair%s, %lld transition%s; discount ", (int)m->n_states, m->n_states == 1 ? "" : "s",
            (int)terminal, (int)m->n_actions, m->n_actions == 1 ? "" : "s", (long long)m->n_pairs,
            m->n_pairs == 1 ? "" : "s", (long long)m->n_trans, m->n_trans == 1 ? "" : "s");
    bc__xml_text(f, g ? g : "?");
    free(g);
    fprintf(f, ", objective %s", m->objective == BC_MAX ? "max (rewards)" : "min (costs)");
    if (m->horizon > 0)
        fprintf(f, ", horizon %d decisions", (int)m->horizon);
    fputs(".</p>\n", f);
    bc__html_safety(f);
}

void bc__html_end(FILE *f)
{
    fputs("<footer>Written by bellcheck " BC_VERSION ". Every number carries its proof: "
          "<span class=\"proof exact\">exact</span> rational arithmetic, "
          "<span class=\"proof interval\">interval</span> outward-rounded bounds, or "
          "<span class=\"proof none\">none</span> (an estimate).</footer>\n</body>\n</html>\n", f);
}

/* The value as the text report words it (escaped). */
static void value_words(FILE *f, double v, bc_proof p)
{
    char *text = NULL;
    size_t len = 0;
    FILE *mem = open_memstream(&text, &len);
    if (mem) {
        bc__value_text(mem, v, p);
        if (fclose(mem) != 0) {
            free(text);
            text = NULL;
        }
    }
    bc__xml_text(f, text ? text : "?");
    free(text);
}

void bc__html_badge(FILE *f, bc_proof_kind k)
{
    const char *kind = bc_proof_kind_name(k);
    fprintf(f, "<span class=\"proof %s\">%s</span>", kind, kind);
}

void bc__html_value(FILE *f, double v, bc_proof p)
{
    value_words(f, v, p);
}

void bc__html_figure(FILE *f, const char *label, double v, bc_proof p)
{
    fputs("<tr><th>", f);
    bc__xml_text(f, label);
    fputs("</th><td class=\"num\">", f);
    value_words(f, v, p);
    fputs("</td><td>", f);
    bc__html_badge(f, p.kind);
    fputs("</td></tr>\n", f);
}

void bc__html_row(FILE *f, const char *label, const char *text)
{
    fputs("<tr><th>", f);
    bc__xml_text(f, label);
    fputs("</th><td colspan=\"2\">", f);
    bc__xml_text(f, text);
    fputs("</td></tr>\n", f);
}

void bc__html_picture(FILE *f, int (*draw)(FILE *f, const void *ctx), const void *ctx,
                      const char *caption)
{
    fputs("<figure>\n", f);
    draw(f, ctx);
    fputs("<figcaption>", f);
    bc__xml_text(f, caption);
    fputs("</figcaption>\n</figure>\n", f);
}

void bc__html_no_pictures(FILE *f)
{
    fputs("<p>No maps: the states of this model are not the cells of a grid. Maps are "
          "drawn for continuous tasks (<code>.task</code> files with <code>--cells</code>) "
          "and for models whose state names are grid cells such as <code>x3y0</code>.</p>\n", f);
}

/* ------------------------------------------------------------------------ */
/* The page of `solve`                                                      */
/* ------------------------------------------------------------------------ */

typedef struct {
    const bc_model *m;
    const bc_layout *l;
    const bc_solution *sol;
} solve_pictures;

static int draw_policy(FILE *f, const void *ctx)
{
    const solve_pictures *p = ctx;
    return bc_svg_policy_map(f, p->m, p->l, p->sol->policy, "Optimal policy");
}

static int draw_residual(FILE *f, const void *ctx)
{
    const solve_pictures *p = ctx;
    return bc_svg_residual(f, p->sol->trace, p->sol->n_trace, p->sol->trace_stride, NULL);
}

static int draw_value(FILE *f, const void *ctx)
{
    const solve_pictures *p = ctx;
    return bc_svg_value_map(f, p->m, p->l, p->sol->values, "Optimal value V*",
                            p->m->objective == BC_MIN ? "V* (cost)" : "V*");
}

/* What the proof says, as table rows. */
static void proof_rows(FILE *f, const bc_model *m, const bc_proof_result *pr)
{
    char buf[320];
    bc__html_row(f, "proof", bc_proof_kind_name(pr->value.kind));
    if (pr->value.kind != BC_PROOF_NONE) {
        snprintf(buf, sizeof buf, "%.3g", pr->value.bound);
        bc__html_row(f, "bound on every value", buf);
        int32_t live = 0;
        for (int32_t s = 0; s < m->n_states; s++)
            live += !m->terminal[s];
        snprintf(buf, sizeof buf, "%s: proven optimal in %d of %d non-terminal states",
                 pr->policy_optimal ? "optimal" : "not proven optimal everywhere",
                 (int)pr->n_proven_optimal, (int)live);
        bc__html_row(f, "policy", buf);
        if (pr->policy_loss > 0) {
            snprintf(buf, sizeof buf, "%.3g (proven bound on its regret in any state)", pr->policy_loss);
            bc__html_row(f, "policy loss", buf);
        }
    }
    if (pr->n_corrected) {
        snprintf(buf, sizeof buf, "%d states changed by the exact check", (int)pr->n_corrected);
        bc__html_row(f, "corrections", buf);
    }
    if (pr->message[0])
        bc__html_row(f, "proof says", pr->message);
}

static void policy_table(FILE *f, const bc_model *m, const bc_solution *sol, int32_t show)
{
    int32_t n = m->n_states < show ? m->n_states : show;
    if (n <= 0)
        return;
    fputs("<h2>Policy</h2>\n<table>\n<tr><th>state</th><th>action</th><th>value</th></tr>\n", f);
    for (int32_t s = 0; s < n; s++) {
        int64_t p = sol->policy[s];
        fputs("<tr><td>", f);
        bc__xml_text(f, bc_names_get(m->state_names, s));
        fputs("</td><td>", f);
        bc__xml_text(f, p >= 0 ? bc_names_get(m->action_names, m->pair_action[p])
                               : m->terminal[s] ? "(terminal)" : "(none)");
        fprintf(f, "</td><td class=\"num\">%.10g</td></tr>\n", sol->values[s]);
    }
    fputs("</table>\n", f);
    if (n < m->n_states)
        fprintf(f, "<p>... %d more states (the JSON report and --values-out / --policy-out hold "
                   "them all).</p>\n", (int)(m->n_states - n));
}

int bc_report_html_solve(FILE *f, const bc_model *m, const bc_layout *l, const bc_solution *sol,
                         const bc_proof_result *pr, int32_t show)
{
    bc__html_begin(f, "solve", m);
    fputs("<h2>Answer</h2>\n<p class=\"verdict\">Optimal value at the initial distribution: ", f);
    bc__html_value(f, sol->value_initial, pr ? pr->initial : (bc_proof){BC_PROOF_NONE, sol->bound});
    fputs("</p>\n<table>\n", f);
    bc__html_figure(f, "value at the initial distribution", sol->value_initial,
                    pr ? pr->initial : (bc_proof){BC_PROOF_NONE, sol->bound});
    bc__html_row(f, "method", bc_method_name(sol->method));
    char buf[64];
    snprintf(buf, sizeof buf, "%lld", (long long)sol->iterations);
    bc__html_row(f, "iterations", buf);
    snprintf(buf, sizeof buf, "%.3f", sol->seconds);
    bc__html_row(f, "seconds", buf);
    if (sol->message[0])
        bc__html_row(f, "solver says", sol->message);
    if (pr)
        proof_rows(f, m, pr);
    fputs("</table>\n", f);
    fputs("<h2>Pictures</h2>\n", f);
    solve_pictures p = {m, l, sol};
    if (l && l->state) {
        bc__html_picture(f, draw_policy, &p, "The optimal policy: each cell in the colour of "
                         "the action taken there; the legend names the actions.");
        bc__html_picture(f, draw_value, &p, "The optimal value V* of each cell (viridis scale: "
                         "darker is lower, brighter is higher).");
    } else {
        bc__html_no_pictures(f);
    }
    if (sol->n_trace > 0)
        bc__html_picture(f, draw_residual, &p, "How the solve converged: per iteration, the "
                         "residual (value iteration: the largest change one sweep makes; policy "
                         "iteration: the largest improvement a single action still offers) and "
                         "the bound on the distance to V* proven at that point, on a logarithmic "
                         "scale.");
    policy_table(f, m, sol, show);
    bc__html_end(f);
    return ferror(f) ? -1 : 0;
}
