package org.forkscape.fit;

import java.math.BigInteger;
import java.util.ArrayList;
import java.util.Arrays;
import java.util.HashMap;
import java.util.List;
import java.util.Map;
import java.util.OptionalInt;
import org.forkscape.plan.AbsorbChoice;

/**
 * The exact rank over the rationals of the 0/1 dummies D = [D_1 ... D_k] of k crossed fixed-effect dimensions
 * over a set of rows, certified from both sides, for three or more dimensions (two have the count by connected
 * components, {@link FixedEffectRank#ofTwo}).
 *
 * <p><b>Reduction.</b> Let m be the dimension with most levels and R the others' dummies. D_m has full column
 * rank L_m (its columns have disjoint supports), so rank D = L_m + rank(M R) with M = I - D_m (D_m'D_m)^-1 D_m'
 * the projection off D_m, and rank(M R) = rank(S) for the Schur complement S = R'R - R'D_m (D_m'D_m)^-1 D_m'R,
 * whose entries are S_jk = n_jk - sum_a c_aj c_ak / n_a (n_jk the rows at levels j and k of the other
 * dimensions, c_aj those at level a of m and level j, n_a those at level a): a dense matrix of the order of the
 * levels outside m, at most {@link AbsorbChoice#MAX_RANK_LEVELS}.
 *
 * <p><b>Lower bound.</b> Reduced modulo a prime p larger than the row count (so each n_a is invertible), every
 * minor of S mod p is the reduction of the rational minor, so the rank r_p of S over GF(p), found by
 * symmetric Gaussian elimination mod p (pivots on the diagonal, {@link Echelon#of}), is at most its rank over Q.
 *
 * <p><b>Upper bound certificate.</b> The echelon form mod p gives, per non-pivot column f, a null vector of S
 * mod p (1 at f, 0 at the other non-pivot columns, the pivots' entries by back substitution). Each entry is
 * lifted to a fraction a/b with |a|, b at most sqrt(q/2) (q the modulus) by rational reconstruction (Wang
 * 1981, "A p-adic algorithm for univariate partial fractions", Proc. ACM SYMSAC '81; von zur Gathen &amp;
 * Gerhard 2013, Modern Computer Algebra, 3rd ed., section 5.10: the extended Euclidean algorithm stopped at the
 * first remainder below the bound), the
 * denominators are cleared, and D v = 0 is checked exactly in integers on the distinct level combinations
 * present: for every level a of m, the other dimensions' entries of v must sum to the same value on every
 * combination at a (that value's negative is then v's entry at a). The vectors are independent (each is
 * nonzero at its own non-pivot column and zero at the others'), so L - r_p of them prove rank(M R) &lt;= r_p,
 * and rank D = L_m + r_p exactly. A lift or check fails only for a prime that divides some minor of the
 * rational echelon form (an unlucky prime) or for entries too large for the modulus; the next prime is then
 * tried, its residues combined with the earlier ones by the Chinese remainder theorem while the echelon pattern
 * agrees (which raises the bound of the lift), and after {@link #PRIMES} primes the rank is reported as not
 * certified, never guessed.
 *
 * <p>Cost: the complement's entries, O(sum over levels a of m of (levels a meets)^2) plus O(rows k^2); its
 * elimination, at most a sixth of the cube of the levels outside m (sparser pivot rows cost less); the checks, per
 * non-pivot column the combinations at the levels of m its vector reaches. Memory: the complement, 8 bytes per
 * entry (32 MB at 2,000 levels). Every step runs in a fixed order, so the result never depends on a thread.
 */
final class ModularDummyRank {
    /**
     * The primes, each below 2^31 so that a product of two residues fits in a long, and above the row count of
     * any set of rows (checked in {@link #rank(long[])}; their primality by {@code BigInteger.isProbablePrime} in
     * the tests).
     */
    static final long[] PRIMES = {2_147_483_647L, 2_147_483_629L, 2_147_483_587L, 2_147_483_579L};

    private final int[] levels;
    private final int rows;
    /** The dimension with most levels, eliminated exactly. */
    private final int largest;
    /** Per other dimension (in order, skipping the largest), the offset of its levels among the M others. */
    private final int[] offset;
    private final int others;
    /** The distinct combinations: per combination its level of the largest and its M-indexed other levels. */
    private final int[] comboLargest;
    private final int[][] comboOthers;
    private final long[] comboCount;
    /** Per level of the largest dimension: its combinations (indices into the arrays above), in first-seen order. */
    private final int[][] combosAt;
    /** Per other level: the levels of the largest dimension it meets, ascending. */
    private final int[][] largestMet;
    /** Per row: its combination. */
    private final int[] comboOfRow;
    /** The pivot columns (other levels) of the certified echelon form, set by {@link #rank}, or null. */
    private int[] certifiedPivots;
    /** Primes tried by the last {@link #rank} call (for the tests). */
    int primesTried;

    /**
     * @param codes  per dimension, the dense level (0..levels-1) of each row; two or more dimensions (the
     *               engine asks for three or more, and the tests compare two with the count by components), not
     *               modified
     * @param levels per dimension, its levels, each present in some row
     * @throws IllegalStateException when more than {@link AbsorbChoice#MAX_RANK_LEVELS} levels lie outside the
     *                               largest dimension (the plan check refuses such plans first)
     */
    ModularDummyRank(int[][] codes, int[] levels) {
        this.levels = levels;
        this.rows = codes[0].length;
        int big = 0;
        for (int d = 1; d < levels.length; d++) {
            if (levels[d] > levels[big]) {
                big = d;
            }
        }
        largest = big;
        offset = new int[levels.length];
        int m = 0;
        for (int d = 0; d < levels.length; d++) {
            offset[d] = m;
            if (d != largest) {
                m += levels[d];
            }
        }
        others = m;
        if (others > AbsorbChoice.MAX_RANK_LEVELS) {
            throw new IllegalStateException(others + " levels outside the largest absorbed column; the plan check "
                    + "refuses more than " + AbsorbChoice.MAX_RANK_LEVELS);
        }
        // the distinct combinations, grouped by the largest dimension's level
        List<Map<Combination, Integer>> byLevel = new ArrayList<>(levels[largest]);
        for (int a = 0; a < levels[largest]; a++) {
            byLevel.add(new HashMap<>());
        }
        comboOfRow = new int[rows];
        List<int[]> otherLevels = new ArrayList<>();
        List<Integer> largestLevel = new ArrayList<>();
        List<long[]> counts = new ArrayList<>();
        List<List<Integer>> at = new ArrayList<>(levels[largest]);
        for (int a = 0; a < levels[largest]; a++) {
            at.add(new ArrayList<>());
        }
        for (int i = 0; i < rows; i++) {
            int[] o = new int[levels.length - 1];
            int t = 0;
            for (int d = 0; d < levels.length; d++) {
                if (d != largest) {
                    o[t++] = offset[d] + codes[d][i];
                }
            }
            int a = codes[largest][i];
            Integer known = byLevel.get(a).putIfAbsent(new Combination(o), otherLevels.size());
            comboOfRow[i] = known == null ? otherLevels.size() : known;
            if (known == null) {
                at.get(a).add(otherLevels.size());
                otherLevels.add(o);
                largestLevel.add(a);
                counts.add(new long[] {1});
            } else {
                counts.get(known)[0]++;
            }
        }
        int combos = otherLevels.size();
        comboOthers = otherLevels.toArray(new int[0][]);
        comboLargest = new int[combos];
        comboCount = new long[combos];
        for (int c = 0; c < combos; c++) {
            comboLargest[c] = largestLevel.get(c);
            comboCount[c] = counts.get(c)[0];
        }
        combosAt = new int[levels[largest]][];
        for (int a = 0; a < combosAt.length; a++) {
            combosAt[a] = at.get(a).stream().mapToInt(Integer::intValue).toArray();
        }
        List<List<Integer>> met = new ArrayList<>(others);
        for (int j = 0; j < others; j++) {
            met.add(new ArrayList<>());
        }
        for (int a = 0; a < combosAt.length; a++) {
            for (int c : combosAt[a]) {
                for (int j : comboOthers[c]) {
                    List<Integer> list = met.get(j);
                    if (list.isEmpty() || list.get(list.size() - 1) != a) {
                        list.add(a);
                    }
                }
            }
        }
        largestMet = new int[others][];
        for (int j = 0; j < others; j++) {
            largestMet[j] = met.get(j).stream().mapToInt(Integer::intValue).toArray();
        }
    }

    /** The certified rank of the dummies, or empty when {@link #PRIMES} primes did not certify one. */
    OptionalInt rank() {
        return rank(PRIMES);
    }

    /**
     * The certified rank from the primes given, in order, or empty when they did not certify one.
     *
     * @param primes primes above the row count, below 2^31 (not modified)
     */
    OptionalInt rank(long[] primes) {
        primesTried = 0;
        BigInteger modulus = null;
        Echelon kept = null;
        BigInteger[][] residues = null;
        for (long p : primes) {
            if (p <= rows || p >= 1L << 31) {
                throw new IllegalArgumentException("the prime " + p + " must exceed the " + rows
                        + " rows and be below 2^31");
            }
            primesTried++;
            Echelon e = Echelon.of(complement(p), p);
            if (e == null) {
                continue;
            }
            if (kept == null || e.rank > kept.rank || !Arrays.equals(e.pivots, kept.pivots)) {
                if (kept != null && e.rank < kept.rank) {
                    continue; // an unlucky prime: its rank is below one already seen, so below the rational rank
                }
                kept = e;
                modulus = BigInteger.valueOf(p);
                residues = e.nullEntries(p);
            } else {
                residues = combined(residues, modulus, e.nullEntries(p), p);
                modulus = modulus.multiply(BigInteger.valueOf(p));
            }
            if (certified(kept, residues, modulus)) {
                certifiedPivots = kept.pivots;
                return OptionalInt.of(levels[largest] + kept.rank);
            }
        }
        return OptionalInt.empty();
    }

    /**
     * The other levels (0..{@link #others}-1) whose columns of the complement are a basis of its column space over Q,
     * as the last successful {@link #rank} call certified them (its pivot columns: their principal submatrix of the
     * complement, and of any positively weighted complement, is nonsingular), or null when none was certified.
     */
    int[] certifiedPivots() {
        return certifiedPivots;
    }

    /** Levels outside the largest dimension: the complement's order. */
    int others() {
        return others;
    }

    /** Distinct combinations of levels present. */
    int combinations() {
        return comboCount.length;
    }

    /** The combination of each row (indices as the codes given), not to be modified. */
    int[] comboOfRow() {
        return comboOfRow;
    }

    /** The largest dimension's level of combination c. */
    int largestLevel(int c) {
        return comboLargest[c];
    }

    /** Combination c's levels of the other dimensions, numbered 0..{@link #others}-1; not to be modified. */
    int[] otherLevels(int c) {
        return comboOthers[c];
    }

    /** Levels of the largest dimension. */
    int largestLevels() {
        return levels[largest];
    }

    /** The combinations at level a of the largest dimension, in first-seen order; not to be modified. */
    int[] combinationsAt(int a) {
        return combosAt[a];
    }

    /** The Schur complement S mod p, dense, others x others. */
    private long[][] complement(long p) {
        long[][] s = new long[others][others];
        for (int c = 0; c < comboCount.length; c++) {
            long n = comboCount[c] % p;
            for (int j : comboOthers[c]) {
                for (int k : comboOthers[c]) {
                    s[j][k] = (s[j][k] + n) % p;
                }
            }
        }
        long[] perLevel = new long[others];
        int[] touched = new int[others];
        for (int a = 0; a < combosAt.length; a++) {
            int count = 0;
            long total = 0;
            for (int c : combosAt[a]) {
                total += comboCount[c];
                for (int j : comboOthers[c]) {
                    if (perLevel[j] == 0) {
                        touched[count++] = j;
                    }
                    perLevel[j] += comboCount[c];
                }
            }
            long inverse = BigInteger.valueOf(total).modInverse(BigInteger.valueOf(p)).longValue();
            for (int x = 0; x < count; x++) {
                int j = touched[x];
                long cj = perLevel[j] % p * inverse % p;
                for (int y = 0; y < count; y++) {
                    int k = touched[y];
                    s[j][k] = (s[j][k] + (p - cj) * (perLevel[k] % p)) % p;
                }
            }
            for (int x = 0; x < count; x++) {
                perLevel[touched[x]] = 0;
            }
        }
        return s;
    }

    /**
     * Whether every null vector of {@code e} lifts from {@code residues} (mod {@code modulus}) to a rational vector
     * v with D v = 0 exactly.
     */
    private boolean certified(Echelon e, BigInteger[][] residues, BigInteger modulus) {
        BigInteger bound = modulus.shiftRight(1).sqrt();
        for (int f = 0; f < e.free.length; f++) {
            BigInteger[] num = new BigInteger[e.rank];
            BigInteger[] den = new BigInteger[e.rank];
            BigInteger common = BigInteger.ONE;
            for (int i = 0; i < e.rank; i++) {
                BigInteger[] q = reconstruct(residues[i][f], modulus, bound);
                if (q == null) {
                    return false;
                }
                num[i] = q[0];
                den[i] = q[1];
                common = common.divide(common.gcd(q[1])).multiply(q[1]);
            }
            BigInteger[] v = new BigInteger[others];
            Arrays.fill(v, BigInteger.ZERO);
            v[e.free[f]] = common;
            for (int i = 0; i < e.rank; i++) {
                v[e.pivots[i]] = num[i].multiply(common.divide(den[i]));
            }
            if (!annihilates(v)) {
                return false;
            }
        }
        return true;
    }

    /**
     * Whether D v = 0 for some entries of v at the largest dimension's levels: at each level a that v's nonzero
     * entries reach, the other levels' entries sum to one value over all of a's combinations (elsewhere to 0).
     */
    private boolean annihilates(BigInteger[] v) {
        boolean small = true;
        long limit = Long.MAX_VALUE / levels.length;
        for (BigInteger x : v) {
            small &= x.bitLength() < 63 && Math.abs(x.longValue()) < limit;
        }
        long[] lv = small ? Arrays.stream(v).mapToLong(BigInteger::longValue).toArray() : null;
        boolean[] seen = new boolean[combosAt.length];
        for (int j = 0; j < others; j++) {
            if (v[j].signum() == 0) {
                continue;
            }
            for (int a : largestMet[j]) {
                if (seen[a]) {
                    continue;
                }
                seen[a] = true;
                int[] cs = combosAt[a];
                if (small) {
                    long first = sum(lv, comboOthers[cs[0]]);
                    for (int x = 1; x < cs.length; x++) {
                        if (sum(lv, comboOthers[cs[x]]) != first) {
                            return false;
                        }
                    }
                } else {
                    BigInteger first = sum(v, comboOthers[cs[0]]);
                    for (int x = 1; x < cs.length; x++) {
                        if (!sum(v, comboOthers[cs[x]]).equals(first)) {
                            return false;
                        }
                    }
                }
            }
        }
        return true;
    }

    private static long sum(long[] v, int[] at) {
        long s = 0;
        for (int j : at) {
            s += v[j];
        }
        return s;
    }

    private static BigInteger sum(BigInteger[] v, int[] at) {
        BigInteger s = BigInteger.ZERO;
        for (int j : at) {
            s = s.add(v[j]);
        }
        return s;
    }

    /**
     * Rational reconstruction: the fraction {a, b} with b &gt; 0, |a| and b at most {@code bound} and a = u b
     * mod m, or null when none exists or it is not in lowest terms (Wang 1981; von zur Gathen &amp; Gerhard 2013,
     * Modern Computer Algebra, section 5.10).
     */
    static BigInteger[] reconstruct(BigInteger u, BigInteger m, BigInteger bound) {
        BigInteger r1 = u.mod(m);
        if (r1.signum() == 0) {
            return new BigInteger[] {BigInteger.ZERO, BigInteger.ONE};
        }
        BigInteger r0 = m;
        BigInteger t0 = BigInteger.ZERO;
        BigInteger t1 = BigInteger.ONE;
        while (r1.compareTo(bound) > 0) {
            BigInteger[] qr = r0.divideAndRemainder(r1);
            r0 = r1;
            r1 = qr[1];
            BigInteger t = t0.subtract(qr[0].multiply(t1));
            t0 = t1;
            t1 = t;
        }
        if (r1.signum() == 0 || t1.abs().compareTo(bound) > 0 || !r1.gcd(t1).equals(BigInteger.ONE)) {
            return null;
        }
        return t1.signum() < 0 ? new BigInteger[] {r1.negate(), t1.negate()} : new BigInteger[] {r1, t1};
    }

    /**
     * Combines residues mod {@code m} with residues mod the prime {@code p} into residues mod m p (the Chinese
     * remainder theorem).
     */
    private static BigInteger[][] combined(BigInteger[][] old, BigInteger m, BigInteger[][] next, long p) {
        BigInteger prime = BigInteger.valueOf(p);
        BigInteger inverse = m.mod(prime).modInverse(prime);
        BigInteger mp = m.multiply(prime);
        BigInteger[][] out = new BigInteger[old.length][];
        for (int i = 0; i < old.length; i++) {
            out[i] = new BigInteger[old[i].length];
            for (int f = 0; f < old[i].length; f++) {
                BigInteger t = next[i][f].subtract(old[i][f]).multiply(inverse).mod(prime);
                out[i][f] = old[i][f].add(m.multiply(t)).mod(mp);
            }
        }
        return out;
    }

    /** Distinct level combination of the other dimensions, as a hash key. */
    private record Combination(int[] levels) {
        @Override
        public boolean equals(Object o) {
            return o instanceof Combination c && Arrays.equals(levels, c.levels);
        }

        @Override
        public int hashCode() {
            return Arrays.hashCode(levels);
        }
    }

    /**
     * The row echelon form mod p of the symmetric complement, each pivot scaled to 1: its rank, pivot columns
     * (ascending), the other (free) columns, and the rows (row c holds, right of c, pivot c's echelon row).
     */
    private record Echelon(int rank, int[] pivots, int[] free, long[][] rows) {
        /**
         * Symmetric Gaussian elimination mod p on the upper triangle of {@code a} (modified), pivots on the
         * diagonal in order: half the work of elimination by rows, since each trailing matrix stays symmetric.
         * Over Q the complement is positive semi-definite, and so is every trailing matrix, so a zero diagonal
         * entry has a zero row there; a zero diagonal whose row mod p is not zero therefore marks a prime that
         * divides a nonzero rational entry (an unlucky prime), and the method returns null so that the next prime
         * is tried. A zero row mod p that is not zero over Q gives too low a rank, which the certificate finds.
         */
        static Echelon of(long[][] a, long p) {
            int n = a.length;
            int[] pivots = new int[n];
            int[] free = new int[n];
            int rank = 0;
            int freeCount = 0;
            int[] nonzero = new int[n];
            double inverseP = 1.0 / p;
            for (int c = 0; c < n; c++) {
                long[] pivot = a[c];
                int count = 0;
                for (int j = c + 1; j < n; j++) {
                    if (pivot[j] != 0) {
                        nonzero[count++] = j;
                    }
                }
                if (pivot[c] == 0) {
                    if (count > 0) {
                        return null;
                    }
                    free[freeCount++] = c;
                    continue;
                }
                long inverse = BigInteger.valueOf(pivot[c]).modInverse(BigInteger.valueOf(p)).longValue();
                for (int x = 0; x < count; x++) {
                    int i = nonzero[x];
                    long minus = p - pivot[i] * inverse % p;
                    long[] row = a[i];
                    // row i of the trailing matrix, from its diagonal on: the pivot row's nonzero entries at j >= i,
                    // or, when most are nonzero, every entry in turn (no indirection)
                    if (2 * (count - x) > n - i) {
                        for (int j = i; j < n; j++) {
                            row[j] = reduce(row[j] + minus * pivot[j], p, inverseP);
                        }
                    } else {
                        for (int y = x; y < count; y++) {
                            int j = nonzero[y];
                            row[j] = reduce(row[j] + minus * pivot[j], p, inverseP);
                        }
                    }
                }
                for (int x = 0; x < count; x++) {
                    int j = nonzero[x];
                    pivot[j] = pivot[j] * inverse % p;
                }
                pivot[c] = 1;
                pivots[rank++] = c;
            }
            return new Echelon(rank, Arrays.copyOf(pivots, rank), Arrays.copyOf(free, freeCount), a);
        }

        /**
         * Per free column f, the null vector that is 1 at f and 0 at the other free columns: its entries at the
         * pivots (rank x free), by back substitution, x_i = -(U_if + sum over later pivots k of U_ik x_k).
         */
        BigInteger[][] nullEntries(long p) {
            int f = free.length;
            long[][] x = new long[rank][f];
            double inverseP = 1.0 / p;
            for (int i = rank - 1; i >= 0; i--) {
                long[] row = rows[pivots[i]];
                long[] acc = x[i];
                for (int t = 0; t < f; t++) {
                    acc[t] = free[t] > pivots[i] ? row[free[t]] : 0;
                }
                for (int k = i + 1; k < rank; k++) {
                    long u = row[pivots[k]];
                    if (u == 0) {
                        continue;
                    }
                    long[] xk = x[k];
                    for (int t = 0; t < f; t++) {
                        acc[t] = reduce(acc[t] + u * xk[t], p, inverseP);
                    }
                }
                for (int t = 0; t < f; t++) {
                    acc[t] = acc[t] == 0 ? 0 : p - acc[t];
                }
            }
            BigInteger[][] out = new BigInteger[rank][f];
            for (int i = 0; i < rank; i++) {
                for (int t = 0; t < f; t++) {
                    out[i][t] = BigInteger.valueOf(x[i][t]);
                }
            }
            return out;
        }

        /**
         * x mod p for 0 &lt;= x &lt; 2^63, by a quotient estimated in floating point and corrected once (the
         * estimate of x / p &lt; 2^32 is off by far less than 1, so x - q p lies in (-p, 2p)): the elimination's hot
         * loop, where an integer division per entry would cost several times as much (Barrett 1986's reduction,
         * with the reciprocal held as a double; Barrett 1986, "Implementing the Rivest Shamir and Adleman public key
         * encryption algorithm on a standard digital signal processor", CRYPTO '86, LNCS 263).
         */
        static long reduce(long x, long p, double inverseP) {
            long r = x - (long) (x * inverseP) * p;
            return r < 0 ? r + p : r >= p ? r - p : r;
        }
    }
}
