package org.forkscape.data;

/**
 * One column while its file is read: numbers into blocks of doubles until a cell that is neither missing
 * nor a decimal number makes it text; from then on codes into blocks of ints, each text kept once in a
 * {@link LevelPool}. The cells before that one were numbers whose spelling is needed as levels ("1.50" is
 * not "1.5"), so when there were any the reader reads those rows again ({@link #needsEarlierRows}) rather
 * than keep every cell's text in case the column turns.
 */
final class ColumnBuilder {
    private final String name;
    private final int shift;
    private Chunks.Doubles numbers;
    private Chunks.Ints codes;
    private LevelPool pool;
    private int textFrom = -1;
    private boolean numbersBeforeText;
    private boolean anyNumber;
    private String tooLarge;
    private long tooLargeLine;

    /** @param shift log2 of the block length, {@link Chunks#shiftFor} the table's column count */
    ColumnBuilder(String name, int shift) {
        this.name = name;
        this.shift = shift;
        this.numbers = new Chunks.Doubles(shift);
    }

    /**
     * Takes row {@code row}'s cell.
     *
     * @return the change in the bytes this column holds (a new block or level; negative when it turns to text)
     */
    long add(int row, String cell, long line) {
        if (codes != null) {
            return code(row, cell);
        }
        if (CsvTableReader.isMissing(cell)) {
            return numbers.set(row, Double.NaN);
        }
        if (NumberSyntax.isDecimal(cell)) {
            double v = Double.parseDouble(cell);
            if (Double.isInfinite(v) && tooLarge == null) {
                tooLarge = cell;
                tooLargeLine = line;
            }
            anyNumber = true;
            return numbers.set(row, v);
        }
        return turnToText(row, cell);
    }

    private long turnToText(int row, String cell) {
        long released = -numbers.bytes();
        numbers = null;
        textFrom = row;
        numbersBeforeText = anyNumber;
        codes = new Chunks.Ints(shift);
        pool = new LevelPool();
        long added = 0;
        for (int i = 0; i < row; i++) {
            added += codes.set(i, -1);
        }
        return released + added + code(row, cell);
    }

    private long code(int row, String cell) {
        if (CsvTableReader.isMissing(cell)) {
            return codes.set(row, -1);
        }
        long before = pool.bytes();
        long block = codes.set(row, pool.code(cell));
        return block + pool.bytes() - before;
    }

    /** Whether rows before {@link #textFrom} held numbers, whose text the reader must read again. */
    boolean needsEarlierRows() {
        return numbersBeforeText;
    }

    int textFrom() {
        return textFrom;
    }

    /**
     * Takes again the cell of a row before {@link #textFrom}, as text.
     *
     * @return the change in the bytes held (a new level)
     */
    long addEarlier(int row, String cell) {
        return code(row, cell);
    }

    /**
     * The finished column of {@code rows} rows; the blocks are released as it is assembled.
     *
     * @throws DataException when it is numeric and a cell is beyond the range of a double
     */
    Column build(int rows, String source) {
        if (codes == null) {
            if (tooLarge != null) {
                throw new DataException(source + ", line " + tooLargeLine, "the value " + abbreviate(tooLarge)
                        + " in column \"" + name + "\" is too large for a number (the limit is about 1.8e308)");
            }
            return new NumericColumn(name, numbers.toArray(rows));
        }
        LevelPool.Sorted sorted = pool.sorted();
        return new CategoricalColumn(name, codes.toArray(rows, sorted.recode()), sorted.levels());
    }

    /** What the blocks hold, which {@link #build} releases. */
    long blockBytes() {
        return codes == null ? numbers.bytes() : codes.bytes();
    }

    /** What {@link #build} allocates for the final array of {@code rows} rows. */
    long finalArrayBytes(int rows) {
        return HeapSizes.array(rows, codes == null ? Double.BYTES : Integer.BYTES);
    }

    private static String abbreviate(String cell) {
        return cell.length() <= 40 ? cell : cell.substring(0, 20) + "..." + cell.substring(cell.length() - 10);
    }
}
