package org.forkscape.infer;

import java.util.ArrayList;
import java.util.List;
import java.util.SplittableRandom;
import org.forkscape.data.Column;
import org.forkscape.data.NumericColumn;
import org.forkscape.data.Table;
import org.junit.jupiter.api.Test;

class BenchExploreTest {
    @Test
    void bench() {
        int n = 5000;
        SplittableRandom r = new SplittableRandom(5);
        List<Column> cols = new ArrayList<>();
        double[] y = new double[n];
        double[] x = new double[n];
        StringBuilder opt = new StringBuilder();
        for (int i = 0; i < n; i++) {
            x[i] = Scenarios.gaussian(r);
            y[i] = 0.05 * x[i] + Scenarios.gaussian(r);
        }
        cols.add(new NumericColumn("y", y));
        cols.add(new NumericColumn("x", x));
        for (int k = 0; k < 10; k++) {
            double[] c = new double[n];
            for (int i = 0; i < n; i++) {
                c[i] = Scenarios.gaussian(r);
                y[i] += 0.1 * c[i];
            }
            cols.add(new NumericColumn("c" + k, c));
            opt.append(k == 0 ? "" : ",").append("\"c").append(k).append('"');
        }
        Table t = new Table("bench.csv", cols);
        String plan = "{\"data\":\"bench.csv\",\"decisions\":[{\"name\":\"o\",\"kind\":\"outcome\",\"alternatives\":[{\"label\":\"y\",\"column\":\"y\"}]},"
                + "{\"name\":\"k\",\"kind\":\"predictor\",\"alternatives\":[{\"label\":\"x\",\"column\":\"x\"}]},"
                + "{\"name\":\"c\",\"kind\":\"controls\",\"optional\":[" + opt + "]}]}";
        var run = Scenarios.run(plan, t);
        for (int threads : new int[] {1, 2}) {
            long t0 = System.nanoTime();
            NullDrawResult res = Scenarios.nullDraws(run, 1000, NullMethod.BOOTSTRAP, 3, null, threads);
            System.out.println(threads + " threads: " + (System.nanoTime() - t0) / 1e9 + " s; p " + res.pMedian());
        }
    }
}
