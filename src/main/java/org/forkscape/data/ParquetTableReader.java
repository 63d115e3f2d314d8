package org.forkscape.data;

import java.io.IOException;
import java.nio.ByteBuffer;
import java.nio.channels.FileChannel;
import java.nio.charset.StandardCharsets;
import java.nio.file.Path;
import java.util.ArrayList;
import java.util.Arrays;
import java.util.HashSet;
import java.util.List;
import java.util.Set;
import org.apache.parquet.ParquetReadOptions;
import org.apache.parquet.column.ColumnDescriptor;
import org.apache.parquet.column.impl.ColumnReadStoreImpl;
import org.apache.parquet.column.page.PageReadStore;
import org.apache.parquet.conf.PlainParquetConfiguration;
import org.apache.parquet.example.DummyRecordConverter;
import org.apache.parquet.hadoop.ParquetFileReader;
import org.apache.parquet.hadoop.metadata.BlockMetaData;
import org.apache.parquet.hadoop.metadata.ColumnChunkMetaData;
import org.apache.parquet.hadoop.metadata.CompressionCodecName;
import org.apache.parquet.hadoop.metadata.ParquetMetadata;
import org.apache.parquet.io.LocalInputFile;
import org.apache.parquet.schema.MessageType;
import org.apache.parquet.schema.Type;

/**
 * Reads a Parquet file, or a folder of Parquet part files ({@link ParquetParts}), into a {@link Table},
 * with Apache Parquet's own Java reader (parquet-hadoop's {@link ParquetFileReader} and its column readers;
 * Apache Parquet format specification, parquet.apache.org). Each part's footer is read first: the columns,
 * their types ({@link ParquetValue}, every unsupported type refused before a value is read), the row count,
 * and the compression of every column chunk. The caps of {@link CsvLimits} apply as to a CSV file, and the
 * final arrays, the row group being decoded and the text levels are asked of the {@link MemoryAllowance}
 * before they are held. Every problem, a corrupt file among them, becomes one {@link DataException} naming
 * the file (and the part, the column and the row where they apply).
 */
public final class ParquetTableReader {
    /** What this build decodes: parquet-hadoop's codecs with snappy-java, zstd-jni and aircompressor. */
    private static final Set<CompressionCodecName> CODECS = Set.of(CompressionCodecName.UNCOMPRESSED,
            CompressionCodecName.SNAPPY, CompressionCodecName.GZIP, CompressionCodecName.ZSTD,
            CompressionCodecName.LZ4_RAW);
    private static final byte[] MAGIC = "PAR1".getBytes(StandardCharsets.US_ASCII);
    /** Rows a Java array can hold. */
    private static final long MAX_ROWS = Integer.MAX_VALUE - 8;

    private final CsvLimits limits;

    public ParquetTableReader(CsvLimits limits) {
        this.limits = limits;
    }

    public ParquetTableReader() {
        this(CsvLimits.DEFAULT);
    }

    /** Reads a file or folder, naming it by its own name in messages, without a memory limit. */
    public Table read(Path data) {
        return read(data, DataFiles.nameOf(data), MemoryAllowance.UNLIMITED);
    }

    /**
     * Reads a file or folder, naming it {@code source} in messages and holding no more than
     * {@code allowance} grants.
     */
    public Table read(Path data, String source, MemoryAllowance allowance) {
        ParquetParts parts = ParquetParts.of(data, source);
        Layout layout = layout(parts, source);
        Held held = new Held(allowance);
        List<ParquetColumn> columns = new ArrayList<>();
        for (int j = 0; j < layout.values.size(); j++) {
            held.add(ParquetColumn.arrayBytes(layout.values.get(j), layout.rows));
        }
        for (int j = 0; j < layout.values.size(); j++) {
            columns.add(new ParquetColumn(layout.names.get(j), layout.values.get(j), layout.descriptors.get(j),
                    (int) layout.rows));
        }
        int row = 0;
        for (Path part : parts.files()) {
            row = readPart(part, where(parts, part, source), columns, row, held);
        }
        List<Column> out = columns.stream().map(ParquetColumn::build).toList();
        return new Table(source, out);
    }

    /**
     * What reading will hold, from the footers alone: every column's final array and the largest row group,
     * decompressed and as stored; text levels come on top, counted as they are read.
     */
    public TableFootprint footprint(Path data, String source) {
        Layout layout = layout(ParquetParts.of(data, source), source);
        long bytes = layout.largestGroup;
        for (ParquetValue v : layout.values) {
            bytes += ParquetColumn.arrayBytes(v, layout.rows);
        }
        return new TableFootprint(layout.rows, layout.values.size(), bytes);
    }

    private int readPart(Path part, String where, List<ParquetColumn> columns, int firstRow, Held held) {
        int row = firstRow;
        try (ParquetFileReader reader = open(part, where)) {
            ParquetMetadata footer = reader.getFooter();
            MessageType schema = footer.getFileMetaData().getSchema();
            String createdBy = footer.getFileMetaData().getCreatedBy();
            for (BlockMetaData group : footer.getBlocks()) {
                long groupBytes = groupBytes(group);
                held.add(groupBytes);
                PageReadStore pages = reader.readNextRowGroup();
                if (pages == null) {
                    throw new DataException(where, "ends before its last row group: the file is cut short or corrupt");
                }
                ColumnReadStoreImpl store = new ColumnReadStoreImpl(pages,
                        new DummyRecordConverter(schema).getRootConverter(), schema, createdBy);
                int count = Math.toIntExact(pages.getRowCount());
                for (int j = 0; j < columns.size(); j++) {
                    ParquetColumn c = columns.get(j);
                    held.add(c.read(store.getColumnReader(schema.getColumnDescription(c.descriptor().getPath())),
                            row, count, where, row + 1L));
                }
                row += count;
                held.add(-groupBytes);
            }
        } catch (DataException e) {
            throw e;
        } catch (IOException | RuntimeException e) {
            throw unreadable(where, part, e);
        }
        return row;
    }

    /** The columns, their readings and the rows of every part, the first part's columns holding for all. */
    private Layout layout(ParquetParts parts, String source) {
        Layout layout = null;
        for (Path part : parts.files()) {
            String where = where(parts, part, source);
            Layout one = layoutOf(part, where);
            if (layout == null) {
                layout = one;
            } else {
                layout = layout.with(one, where, parts.name(parts.files().get(0)));
            }
        }
        if (layout.values.isEmpty()) {
            throw new DataException(source, "has no columns");
        }
        if (layout.values.size() > limits.maxColumns()) {
            throw new DataException(source, String.format("has %,d columns; at most %,d are accepted",
                    layout.values.size(), limits.maxColumns()));
        }
        if (layout.rows == 0) {
            throw new DataException(source, "has columns but no data rows");
        }
        if (layout.rows > MAX_ROWS || layout.rows * layout.values.size() > limits.maxCells()) {
            throw new DataException(source, String.format("has more than %,d cells (rows times columns), the "
                    + "limit of this server", limits.maxCells()));
        }
        return layout;
    }

    private Layout layoutOf(Path part, String where) {
        ParquetMetadata footer;
        try (ParquetFileReader reader = open(part, where)) {
            footer = reader.getFooter();
        } catch (DataException e) {
            throw e;
        } catch (IOException | RuntimeException e) {
            throw unreadable(where, part, e);
        }
        MessageType schema = footer.getFileMetaData().getSchema();
        List<String> names = new ArrayList<>();
        List<ParquetValue> values = new ArrayList<>();
        List<ColumnDescriptor> descriptors = new ArrayList<>();
        Set<String> seen = new HashSet<>();
        for (Type field : schema.getFields()) {
            String name = field.getName().strip();
            String column = where + ", column \"" + field.getName() + "\"";
            if (name.isEmpty()) {
                throw new DataException(column, "has an empty name");
            }
            if (!seen.add(name)) {
                throw new DataException(column, "the column name appears twice; column names must be unique");
            }
            values.add(ParquetValue.of(field, column));
            names.add(name);
            descriptors.add(schema.getColumnDescription(new String[] {field.getName()}));
        }
        long rows = 0;
        long largest = 0;
        for (BlockMetaData group : footer.getBlocks()) {
            rows += group.getRowCount();
            largest = Math.max(largest, groupBytes(group));
            for (ColumnChunkMetaData chunk : group.getColumns()) {
                if (!CODECS.contains(chunk.getCodec())) {
                    throw new DataException(where + ", column \"" + chunk.getPath().toDotString() + "\"", "is compressed "
                            + "with " + chunk.getCodec() + ", which this reader does not decode; write the file with "
                            + "SNAPPY, GZIP, ZSTD, LZ4_RAW or no compression");
                }
            }
        }
        return new Layout(names, values, descriptors, rows, largest);
    }

    /**
     * Opens a part for reading, refusing first a file that lacks the four bytes {@code PAR1} at its start
     * and end, which every Parquet file has (format specification, "File format").
     */
    private static ParquetFileReader open(Path part, String where) throws IOException {
        try (FileChannel channel = FileChannel.open(part)) {
            long size = channel.size();
            ByteBuffer head = ByteBuffer.allocate(MAGIC.length);
            ByteBuffer tail = ByteBuffer.allocate(MAGIC.length);
            if (size < 2L * MAGIC.length + 4 || channel.read(head, 0) < MAGIC.length
                    || channel.read(tail, size - MAGIC.length) < MAGIC.length
                    || !Arrays.equals(head.array(), MAGIC) || !Arrays.equals(tail.array(), MAGIC)) {
                throw new DataException(where, "is not a Parquet file: it does not begin and end with PAR1, the mark "
                        + "of every Parquet file (is it cut short, or a file of another kind?)");
            }
        }
        return open(part);
    }

    private static ParquetFileReader open(Path part) throws IOException {
        ParquetReadOptions options = ParquetReadOptions.builder(new PlainParquetConfiguration())
                .usePageChecksumVerification(true)
                .build();
        return ParquetFileReader.open(new LocalInputFile(part), options);
    }

    /** A row group's pages as stored and decompressed, which the reader holds while it decodes them. */
    private static long groupBytes(BlockMetaData group) {
        return group.getTotalByteSize() + group.getCompressedSize();
    }

    private static String where(ParquetParts parts, Path part, String source) {
        return parts.isFolder() ? source + ", part " + parts.name(part) : source;
    }

    /** The library's first line, without the server's path of the file. */
    private static DataException unreadable(String where, Path part, Exception e) {
        String message = e.getMessage() == null ? e.getClass().getSimpleName() : e.getMessage();
        message = message.lines().findFirst().orElse("").replaceAll("\\S*InputFile@\\p{XDigit}+", "the file").replace("file:" + part.toAbsolutePath(), "the file")
                .replace(part.toAbsolutePath().toString(), "the file").replace(part.toString(), "the file");
        return new DataException(where, "is not a readable Parquet file (" + message.strip() + ")");
    }

    /** The columns of the data and what it holds, from the footers. */
    private record Layout(List<String> names, List<ParquetValue> values, List<ColumnDescriptor> descriptors,
            long rows, long largestGroup) {
        /** This layout with another part's rows, refused when that part's columns differ. */
        Layout with(Layout part, String where, String firstName) {
            boolean same = part.names.equals(names) && part.types().equals(types());
            if (!same) {
                throw new DataException(where, "has other columns than " + firstName + " (" + describe(part) + " against "
                        + describe(this) + "); every part of a folder must have the same columns in the same order");
            }
            return new Layout(names, values, descriptors, rows + part.rows, Math.max(largestGroup, part.largestGroup));
        }

        /** Each column's Parquet type with its annotation, as the parts are compared. */
        List<String> types() {
            return descriptors.stream().map(d -> ParquetValue.describe(d.getPrimitiveType())).toList();
        }

        private static String describe(Layout l) {
            List<String> out = new ArrayList<>();
            for (int j = 0; j < l.names.size(); j++) {
                out.add(l.names.get(j) + " " + l.types().get(j));
            }
            return String.join(", ", out);
        }
    }

    /** What the reading holds, asked of the allowance each time it passes what was granted. */
    private static final class Held {
        private final MemoryAllowance allowance;
        private long held;
        private long granted;

        Held(MemoryAllowance allowance) {
            this.allowance = allowance;
        }

        void add(long bytes) {
            held += bytes;
            if (held > granted) {
                granted = allowance.require(held);
            }
        }
    }
}
