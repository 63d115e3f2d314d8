package org.forkscape.run;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertTrue;

import java.math.BigInteger;
import java.nio.charset.StandardCharsets;
import java.nio.file.Files;
import java.nio.file.Path;
import java.util.List;
import java.util.Map;
import java.util.SplittableRandom;
import org.forkscape.data.CsvTableReader;
import org.forkscape.data.Table;
import org.forkscape.plan.Plan;
import org.forkscape.plan.PlanReader;
import org.forkscape.plan.SpecificationSpace;
import org.junit.jupiter.api.Test;
import org.junit.jupiter.api.io.TempDir;

/**
 * A sampled run of a plan of 10 x 2^60 specifications (beyond a long; the engine's limit of 64 model
 * variables keeps a runnable plan near 2^63): its exact count and specification numbers in the results,
 * choices from the whole space, and its specifications.csv read back to the same run.
 */
class BeyondLongRunTest {
    private static final int OPTIONAL = 20;

    @TempDir
    Path folder;

    /** Library visits (two measures) per district against outreach hours and 60 invented neighbourhood measures. */
    private Plan plan() throws Exception {
        SplittableRandom random = new SplittableRandom(11);
        StringBuilder csv = new StringBuilder("visits,loans,outreach");
        for (int d = 0; d < 3; d++) {
            for (int i = 0; i < OPTIONAL; i++) {
                csv.append(",m").append(d).append('_').append(i);
            }
        }
        csv.append('\n');
        for (int row = 0; row < 400; row++) {
            double outreach = random.nextDouble() * 10;
            csv.append(3 + 0.4 * outreach + random.nextGaussian()).append(',').append(1 + 0.2 * outreach + random.nextGaussian())
                    .append(',').append(outreach);
            for (int c = 0; c < 3 * OPTIONAL; c++) {
                csv.append(',').append(random.nextGaussian());
            }
            csv.append('\n');
        }
        Files.writeString(folder.resolve("visits.csv"), csv, StandardCharsets.UTF_8);
        StringBuilder decisions = new StringBuilder("{\"name\": \"y\", \"kind\": \"outcome\", \"alternatives\": "
                + "[{\"label\": \"visits\", \"column\": \"visits\"}, {\"label\": \"loans\", \"column\": \"loans\"}]}, {\"name\": \"x\", \"kind\": \"predictor\", "
                + "\"alternatives\": [{\"label\": \"outreach\", \"column\": \"outreach\"}]}");
        for (int d = 0; d < 3; d++) {
            decisions.append(", {\"name\": \"set").append(d).append("\", \"kind\": \"controls\", \"optional\": [");
            for (int i = 0; i < OPTIONAL; i++) {
                decisions.append(i == 0 ? "" : ", ").append("\"m").append(d).append('_').append(i).append('"');
            }
            decisions.append("]}");
        }
        decisions.append(", {\"name\": \"se\", \"kind\": \"errors\", \"alternatives\": "
                + "[\"classical\", \"HC0\", \"HC1\", \"HC2\", \"HC3\"]}");
        return new PlanReader(true).read("{\"data\": \"visits.csv\", \"sample\": 100, \"seed\": 5, \"decisions\": ["
                + decisions + "]}", folder);
    }

    @Test
    void theRunWritesExactNumbersAndReadsBack() throws Exception {
        Plan plan = plan();
        Table table = new CsvTableReader().read(plan.dataFile());
        RunResult run = new MultiverseRunner(2).run(plan, table, RunProgress.SILENT, null);
        assertEquals(100, run.results().size());

        Provenance provenance = Provenance.of(new RunOrigin("run", new byte[0], plan.dataFile()), plan.seed(), 2);
        Map<String, Object> summary = SummaryJson.of(run, Map.of(), provenance);
        assertEquals(BigInteger.TWO.pow(60).multiply(BigInteger.TEN).toString(), summary.get("specifications_in_plan"));
        assertEquals(true, summary.get("sampled"));

        Path csv = folder.resolve("specifications.csv");
        SpecificationsCsv.write(run, csv);
        List<String> lines = Files.readAllLines(csv, StandardCharsets.UTF_8);
        SpecificationSpace space = new SpecificationSpace(plan);
        int beyond = 0;
        for (int i = 1; i < lines.size(); i++) {
            String[] cells = lines.get(i).split(",", -1);
            BigInteger number = new BigInteger(cells[0]);
            beyond += number.compareTo(BigInteger.valueOf(Long.MAX_VALUE)) > 0 ? 1 : 0;
            long[] choices = new long[6];
            space.decode(space.key(number), choices);
            BigInteger index = BigInteger.valueOf(choices[0]);
            for (int d = 2; d < 5; d++) {
                index = index.shiftLeft(OPTIONAL).add(BigInteger.valueOf(choices[d]));
            }
            index = index.multiply(BigInteger.valueOf(5)).add(BigInteger.valueOf(choices[5]));
            assertEquals(index.add(BigInteger.ONE), number, "line " + (i + 1) + ": the number is the choices' index + 1");
        }
        // a share 1 - 2^63 / (10 x 2^60) = 0.2 of the space lies beyond 2^63, where a sampler bounded by a
        // long draws nothing: binomial(100, 0.2) has mean 20 and standard deviation 4
        assertTrue(beyond >= 5, beyond + " of 100 beyond 2^63");

        RunResult back = SpecificationsCsvReader.read(plan, table, csv, run.seconds());
        for (int s = 0; s < run.results().size(); s++) {
            assertEquals(run.results().specIndex(s), back.results().specIndex(s));
            assertEquals(run.results().estimate(s), back.results().estimate(s));
        }
    }
}
