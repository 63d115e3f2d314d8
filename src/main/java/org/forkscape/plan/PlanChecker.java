package org.forkscape.plan;

import java.util.List;
import java.util.Optional;
import org.forkscape.InputException;
import org.forkscape.data.CategoricalColumn;
import org.forkscape.data.Column;
import org.forkscape.data.CsvTableReader;
import org.forkscape.data.NumericColumn;
import org.forkscape.data.Table;

/**
 * Checks a plan against its data: every named column exists (with the nearest name suggested when it
 * does not) and has a type its role allows. Each problem is a {@link PlanException} at the JSON path of
 * the field that names the column; the check goes on to the next field and throws once, at the end, with
 * the first problem and every other one ({@link PlanException#all()}). A plan whose every specification is
 * bound to fail is refused too ({@link BoundToFail}).
 */
public final class PlanChecker {
    private PlanChecker() {
    }

    public static void check(Plan plan, Table table) {
        PlanProblems problems = new PlanProblems();
        List<Decision> ds = plan.decisions();
        for (int i = 0; i < ds.size(); i++) {
            String path = "decisions[" + i + "]";
            Decision d = ds.get(i);
            if (d instanceof Decision.Outcome o) {
                variables(o.alternatives(), path, table, "outcome", problems);
            } else if (d instanceof Decision.Predictor p) {
                variables(p.alternatives(), path, table, "key predictor", problems);
                notAlsoOutcome(p, path, plan, problems);
            } else if (d instanceof Decision.Controls c) {
                controls(c, path, table, plan, problems);
            } else if (d instanceof Decision.Sample s) {
                sample(s, path, table, problems);
            } else if (d instanceof Decision.Errors e) {
                for (int j = 0; j < e.alternatives().size(); j++) {
                    ErrorType t = e.alternatives().get(j);
                    String p = path + ".alternatives[" + j + "]";
                    for (String column : t.clusterColumns()) {
                        problems.attempt(() -> existing(column, p, table));
                    }
                    if (t.kind() == ErrorType.Kind.HC2 || t.kind() == ErrorType.Kind.HC3) {
                        problems.attempt(() -> leverageLevels(t, p, plan, table));
                    }
                }
            } else if (d instanceof Decision.Model m) {
                for (int j = 0; j < m.alternatives().size(); j++) {
                    ModelFamily family = m.alternatives().get(j);
                    String p = path + ".alternatives[" + j + "]";
                    problems.attempt(() -> outcomeFits(family, p, plan, table));
                }
            } else if (d instanceof Decision.Weights w) {
                for (int j = 0; j < w.alternatives().size(); j++) {
                    WeightChoice choice = w.alternatives().get(j);
                    String p = path + ".alternatives[" + j + "].column";
                    if (choice.weighted()) {
                        problems.attempt(() -> weightColumn(existing(choice.column(), p, table), p));
                    }
                }
            } else if (d instanceof Decision.Absorb a) {
                for (int j = 0; j < a.alternatives().size(); j++) {
                    List<String> cols = a.alternatives().get(j).columns();
                    if (cols.size() > 1 && plan.generalized() && plan.nullDraws() > 0) {
                        String p = path + ".alternatives[" + j + "].columns";
                        problems.attempt(() -> {
                            throw new PlanException(p, "null draws are not made for logit, probit and poisson "
                                    + "beside two or more absorbed columns; set nullDraws to 0 (--null-draws 0), "
                                    + "absorb one column, or make the draws in a plan whose model decision is ols "
                                    + "alone");
                        });
                    }
                    if (cols.size() > 2) {
                        AbsorbChoice choice = a.alternatives().get(j);
                        String p = path + ".alternatives[" + j + "].columns";
                        problems.attempt(() -> rankLevels(choice, p, table));
                    }
                    for (int k = 0; k < cols.size(); k++) {
                        String name = cols.get(k);
                        String p = path + ".alternatives[" + j + "].columns[" + k + "]";
                        // beside other columns the levels are projected out, not entered as coefficients
                        boolean alone = cols.size() == 1;
                        problems.attempt(() -> {
                            Column c = existing(name, p, table);
                            if (alone) {
                                levelsForModels(c, p, plan);
                            }
                        });
                    }
                }
            }
        }
        if (plan.nullCluster() != null && !plan.nullCluster().equals(Plan.NULL_CLUSTER_ROWS)) {
            problems.attempt(() -> existing(plan.nullCluster(), "nullCluster", table));
        }
        problems.throwIfAny();
        if (table.holdsRows()) {
            // a table whose rows are held elsewhere (on a cluster) cannot be searched for doomed decisions here
            BoundToFail.refuse(plan, table);
        }
    }

    /**
     * Why a column that looks like numbers reads as text: {@code ""} for a plain text column, otherwise
     * a clause naming the few cells that are not numbers.
     */
    static String whyText(Column c) {
        if (!(c instanceof CategoricalColumn cat) || cat.strayTextLevels().isEmpty()) {
            return "";
        }
        return "; it reads as text because of the value" + (cat.strayTextLevels().size() == 1 ? " " : "s ")
                + String.join(", ", cat.strayTextLevels().stream().map(l -> "\"" + l + "\"").toList())
                + " (a missing cell is written as " + CsvTableReader.MISSING_SPELLINGS + ")";
    }

    private static void variables(List<VariableChoice> alts, String path, Table table, String role,
            PlanProblems problems) {
        for (int j = 0; j < alts.size(); j++) {
            int at = j;
            problems.attempt(() -> variable(alts.get(at), path + ".alternatives[" + at + "]", table, role));
        }
    }

    private static void variable(VariableChoice v, String alternative, Table table, String role) {
        String p = alternative + ".column";
        Column c = existing(v.column(), p, table);
        if (c instanceof CategoricalColumn cat) {
            if (cat.levels().size() != 2) {
                throw new PlanException(p, "\"" + c.name() + "\" is categorical with " + cat.levels().size()
                        + " level" + (cat.levels().size() == 1 ? "" : "s") + "; a categorical " + role
                        + " needs exactly two levels (the first in sorted order is coded 0, the other 1)"
                        + whyText(c));
            }
            if (!(v.transform() instanceof Transform.Identity)) {
                throw new PlanException(alternative + ".transform",
                        "\"" + c.name() + "\" is categorical; transforms apply to numeric columns only");
            }
        }
    }

    /**
     * A logit or probit model needs every outcome alternative coded 0/1 (numeric 0 and 1, or a two-level
     * categorical), a Poisson model a non-negative numeric one; both fit the outcome as recorded, without a
     * transform. Anything else is an error at the model alternative's path naming the column and rows.
     */
    private static void outcomeFits(ModelFamily family, String path, Plan plan, Table table) {
        if (family.leastSquares()) {
            return;
        }
        List<VariableChoice> outcomes = plan.outcome().alternatives();
        for (VariableChoice v : outcomes) {
            String name = InputException.quoted(v.column());
            if (!(v.transform() instanceof Transform.Identity)) {
                throw new PlanException(path, family.spelling() + " fits the outcome as recorded, but the outcome "
                        + name + " has the transform " + v.transform().spelling() + "; drop the transform, or fit "
                        + "that alternative with ols");
            }
            Column c = table.column(v.column());
            if (c instanceof CategoricalColumn) {
                if (!family.binary()) {
                    throw new PlanException(path, family.spelling() + " needs a numeric outcome of counts or "
                            + "non-negative amounts; " + name + " is categorical");
                }
                continue;
            }
            double[] values = ((NumericColumn) c).values();
            List<Integer> bad = new java.util.ArrayList<>();
            int count = 0;
            for (int r = 0; r < values.length; r++) {
                double y = values[r];
                boolean wrong = !Double.isNaN(y) && (family.binary() ? y != 0 && y != 1 : y < 0);
                if (wrong) {
                    count++;
                    if (bad.size() < 5) {
                        bad.add(r + 1);
                    }
                }
            }
            if (count > 0) {
                String rows = String.join(", ", bad.stream().map(String::valueOf).toList())
                        + (count > bad.size() ? " and " + (count - bad.size()) + " more" : "");
                throw new PlanException(path, family.spelling() + " needs " + (family.binary()
                        ? "an outcome coded 0/1" : "a non-negative outcome") + "; " + name + " has "
                        + (family.binary() ? "other values" : "negative values") + " in data row"
                        + (count == 1 ? " " : "s ") + rows + " (counting data rows from 1)");
            }
        }
    }

    /**
     * HC2 and HC3 beside two absorbed columns take each row's leverage from a dense factorisation over the
     * levels of the column with fewer of them ({@code fit.CrossedDummyLeverage}): at most
     * {@link AbsorbChoice#MAX_LEVERAGE_LEVELS} levels there, counted over the table's rows where both columns
     * have a value (no specification's rows hold more). Beside three or more columns the leverages come from the
     * exact rank's pivot levels ({@code fit.SeveralDummyLeverage}), within the limit {@link #rankLevels} checks.
     * A column that is not in the table is reported at its own field.
     */
    private static void leverageLevels(ErrorType t, String path, Plan plan, Table table) {
        List<Decision> ds = plan.decisions();
        for (int i = 0; i < ds.size(); i++) {
            if (!(ds.get(i) instanceof Decision.Absorb a)) {
                continue;
            }
            for (int j = 0; j < a.alternatives().size(); j++) {
                AbsorbChoice choice = a.alternatives().get(j);
                List<String> cols = choice.columns();
                if (!table.holdsRows() || cols.size() != 2 || table.find(cols.get(0)).isEmpty()
                        || table.find(cols.get(1)).isEmpty()) {
                    continue;
                }
                long[] levels = levelsWhereAll(cols.stream().map(table::column).toList());
                if (Math.min(levels[0], levels[1]) > AbsorbChoice.MAX_LEVERAGE_LEVELS) {
                    throw new PlanException(path, InputException.quoted(t.label()) + " beside two absorbed columns "
                            + "needs each row's leverage, computed exactly from a factorisation over the levels of the "
                            + "column with fewer of them; here " + InputException.quoted(cols.get(0)) + " has "
                            + String.format("%,d", levels[0]) + " and " + InputException.quoted(cols.get(1)) + " "
                            + String.format("%,d", levels[1]) + " levels (decisions[" + i + "].alternatives[" + j
                            + "], " + choice.label() + "), more than the " + String.format("%,d",
                            AbsorbChoice.MAX_LEVERAGE_LEVELS) + " that keep it cheap; use HC0, HC1 or cluster errors, "
                            + "or absorb one column and enter the other as a categorical control");
                }
            }
        }
    }

    /**
     * Three or more absorbed columns: the dummies' exact rank eliminates a dense matrix over the levels outside
     * the column with most of them ({@code fit.ModularDummyRank}), at most {@link AbsorbChoice#MAX_RANK_LEVELS},
     * counted over the table's rows where every column has a value (no specification's rows hold more outside
     * their own largest column). A column that is not in the table is reported at its own field.
     */
    private static void rankLevels(AbsorbChoice choice, String path, Table table) {
        List<String> cols = choice.columns();
        if (!table.holdsRows() || cols.stream().anyMatch(c -> table.find(c).isEmpty())) {
            return;
        }
        long[] levels = levelsWhereAll(cols.stream().map(table::column).toList());
        long total = java.util.Arrays.stream(levels).sum();
        long most = java.util.Arrays.stream(levels).max().orElse(0);
        if (total - most > AbsorbChoice.MAX_RANK_LEVELS) {
            StringBuilder counts = new StringBuilder();
            for (int k = 0; k < cols.size(); k++) {
                counts.append(k == 0 ? "" : k == cols.size() - 1 ? " and " : ", ")
                        .append(InputException.quoted(cols.get(k))).append(" has ")
                        .append(String.format("%,d", levels[k]));
            }
            throw new PlanException(path, choice.label() + ": the exact rank of " + cols.size() + " absorbed columns' "
                    + "dummies eliminates a dense matrix over the levels outside the column with most of them; here "
                    + counts + " levels, so " + String.format("%,d", total - most) + " lie outside it, more than the "
                    + String.format("%,d", AbsorbChoice.MAX_RANK_LEVELS) + " that keep it cheap; absorb the two "
                    + "columns with most levels and enter the others as categorical controls");
        }
    }

    /** The distinct values of each grouping column over the rows where all of them have one. */
    private static long[] levelsWhereAll(List<Column> columns) {
        List<java.util.Set<Object>> seen = new java.util.ArrayList<>();
        for (int k = 0; k < columns.size(); k++) {
            seen.add(new java.util.HashSet<>());
        }
        int rows = columns.get(0).size();
        for (int r = 0; r < rows; r++) {
            final int row = r;
            if (columns.stream().anyMatch(c -> c.isMissing(row))) {
                continue;
            }
            for (int k = 0; k < columns.size(); k++) {
                seen.get(k).add(valueAt(columns.get(k), r));
            }
        }
        return seen.stream().mapToLong(java.util.Set::size).toArray();
    }

    private static Object valueAt(Column c, int row) {
        return c instanceof CategoricalColumn cat ? (Object) cat.codes()[row] : (Object) ((NumericColumn) c).values()[row];
    }

    /** A generalized linear model enters absorbed fixed effects as coefficients: at most so many levels. */
    private static void levelsForModels(Column c, String path, Plan plan) {
        if (!plan.generalized()) {
            return;
        }
        long levels;
        if (c instanceof CategoricalColumn cat) {
            levels = cat.levels().size();
        } else {
            levels = java.util.Arrays.stream(((NumericColumn) c).values()).filter(v -> !Double.isNaN(v)).distinct()
                    .count();
        }
        if (levels > ModelFamily.MAX_ABSORBED_LEVELS) {
            String model = plan.modelFamilies().stream().filter(f -> !f.leastSquares()).findFirst().orElseThrow()
                    .spelling();
            throw new PlanException(path, String.format("%s enters fixed effects as one coefficient per level, and "
                    + "\"%s\" has %,d levels, above the limit of %,d; absorb a coarser column for the "
                    + "generalized linear models, or fit these fixed effects with ols alone", model, c.name(), levels,
                    ModelFamily.MAX_ABSORBED_LEVELS));
        }
    }

    private static void notAlsoOutcome(Decision.Predictor p, String path, Plan plan, PlanProblems problems) {
        for (int j = 0; j < p.alternatives().size(); j++) {
            String column = p.alternatives().get(j).column();
            if (plan.outcome().alternatives().stream().anyMatch(v -> v.column().equals(column))) {
                String at = path + ".alternatives[" + j + "].column";
                problems.attempt(() -> {
                    throw new PlanException(at, "\"" + column + "\" is also an alternative of the outcome; a column "
                            + "cannot be both the outcome and the key predictor");
                });
            }
        }
    }

    private static void controls(Decision.Controls c, String path, Table table, Plan plan, PlanProblems problems) {
        checkControlList(c.required(), path + ".required", table, plan, problems);
        checkControlList(c.optional(), path + ".optional", table, plan, problems);
        if (c.sets() != null) {
            c.sets().forEach((label, cols) -> checkControlList(cols, path + ".sets." + label, table, plan, problems));
        }
    }

    private static void checkControlList(List<String> cols, String path, Table table, Plan plan,
            PlanProblems problems) {
        for (int k = 0; k < cols.size(); k++) {
            String name = cols.get(k);
            String at = path + "[" + k + "]";
            problems.attempt(() -> control(name, at, table, plan));
        }
    }

    private static void control(String name, String at, Table table, Plan plan) {
        existing(name, at, table);
        boolean isKey = plan.predictor().alternatives().stream().anyMatch(v -> v.column().equals(name));
        boolean isOutcome = plan.outcome().alternatives().stream().anyMatch(v -> v.column().equals(name));
        if (isKey || isOutcome) {
            throw new PlanException(at, "\"" + name + "\" is also an alternative of the "
                    + (isKey ? "key predictor" : "outcome") + "; a column cannot be both");
        }
    }

    private static void sample(Decision.Sample s, String path, Table table, PlanProblems problems) {
        for (int j = 0; j < s.alternatives().size(); j++) {
            String p = path + ".alternatives[" + j + "]";
            SampleRule rule = s.alternatives().get(j);
            problems.attempt(() -> sampleRule(rule, p, table));
        }
    }

    private static void sampleRule(SampleRule rule, String p, Table table) {
        if (rule instanceof SampleRule.KeepRows k) {
            k.expression().bind(table, p + ".keep");
        } else if (rule instanceof SampleRule.TrimRows t) {
            Column c = existing(t.column(), p + ".trim.column", table);
            if (!(c instanceof NumericColumn)) {
                throw new PlanException(p + ".trim.column", "\"" + c.name()
                        + "\" is categorical; a z-score trim needs a numeric column" + whyText(c));
            }
        }
    }

    /** Rows named in a message about bad weights: the first few. */
    private static final int ROWS_NAMED = 5;

    /**
     * A weight column is numeric, and every present weight is finite and not negative: a negative or
     * infinite analytic weight has no meaning in weighted least squares (R's {@code lm.wfit} refuses
     * negative weights too). Zero is allowed (the row takes no part); a missing weight drops its row.
     */
    private static void weightColumn(Column c, String path) {
        if (!(c instanceof NumericColumn numeric)) {
            throw new PlanException(path, InputException.quoted(c.name()) + " is categorical; weights must be a "
                    + "numeric column" + whyText(c));
        }
        double[] v = numeric.values();
        List<Integer> bad = new java.util.ArrayList<>();
        int count = 0;
        for (int i = 0; i < v.length; i++) {
            if (v[i] < 0 || Double.isInfinite(v[i])) {
                count++;
                if (bad.size() < ROWS_NAMED) {
                    bad.add(i + 1);
                }
            }
        }
        if (count > 0) {
            throw new PlanException(path, "the weights in " + InputException.quoted(c.name()) + " must be finite and "
                    + "not negative; " + count + " row" + (count == 1 ? " is" : "s are") + " not (data row"
                    + (count == 1 ? " " : "s ") + String.join(", ", bad.stream().map(String::valueOf).toList())
                    + (count > bad.size() ? ", ..." : "") + ", counting from 1 below the header); fix them, or leave "
                    + "the cell empty to drop the row");
        }
    }

    private static Column existing(String name, String path, Table table) {
        Optional<Column> c = table.find(name);
        if (c.isEmpty()) {
            String hint = table.nearestName(name).map(n -> "; did you mean \"" + n + "\"?").orElse("");
            throw new PlanException(path, InputException.quoted(name) + " is not a column of " + table.source() + hint);
        }
        return c.get();
    }
}
