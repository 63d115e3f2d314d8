package org.forkscape.data;

import java.io.IOException;
import java.io.UncheckedIOException;
import java.math.BigDecimal;
import java.nio.file.Files;
import java.nio.file.Path;
import java.util.List;
import org.apache.parquet.conf.PlainParquetConfiguration;
import org.apache.parquet.example.data.Group;
import org.apache.parquet.example.data.simple.SimpleGroupFactory;
import org.apache.parquet.hadoop.ParquetWriter;
import org.apache.parquet.hadoop.example.ExampleParquetWriter;
import org.apache.parquet.hadoop.metadata.CompressionCodecName;
import org.apache.parquet.io.LocalOutputFile;
import org.apache.parquet.io.api.Binary;
import org.apache.parquet.schema.LogicalTypeAnnotation.DecimalLogicalTypeAnnotation;
import org.apache.parquet.schema.MessageType;
import org.apache.parquet.schema.MessageTypeParser;
import org.apache.parquet.schema.PrimitiveType;
import org.apache.parquet.schema.Type;

/**
 * Parquet files for tests, written by Apache Parquet's own writer (parquet-hadoop's example writer over
 * Parquet's schema text), so that what the reader is checked on comes from the library, never from bytes
 * typed by hand. A row is a list of cells, null for a null; text, numbers and booleans are written as the
 * column's type asks (a decimal from its decimal text); a {@code byte[]} cell is written as those bytes.
 */
public final class ParquetFiles {
    private ParquetFiles() {
    }

    /** Options of one file: its codec, dictionary encoding and the rows in each row group (0: the default). */
    public record Options(CompressionCodecName codec, boolean dictionary, int rowsPerGroup) {
        public static final Options DEFAULT = new Options(CompressionCodecName.SNAPPY, true, 0);

        public Options withCodec(CompressionCodecName c) {
            return new Options(c, dictionary, rowsPerGroup);
        }

        public Options withDictionary(boolean d) {
            return new Options(codec, d, rowsPerGroup);
        }

        public Options withRowsPerGroup(int rows) {
            return new Options(codec, dictionary, rows);
        }
    }

    /** Writes {@code rows} under {@code schema} (Parquet's schema text, {@code message m { ... }}). */
    public static Path write(Path file, String schema, List<List<Object>> rows) {
        return write(file, schema, rows, Options.DEFAULT);
    }

    public static Path write(Path file, String schema, List<List<Object>> rows, Options options) {
        MessageType type = MessageTypeParser.parseMessageType(schema);
        SimpleGroupFactory groups = new SimpleGroupFactory(type);
        try {
            Files.deleteIfExists(file);
            ExampleParquetWriter.Builder builder = ExampleParquetWriter.builder(new LocalOutputFile(file))
                    .withType(type)
                    .withConf(new PlainParquetConfiguration())
                    .withCompressionCodec(options.codec())
                    .withDictionaryEncoding(options.dictionary());
            if (options.rowsPerGroup() > 0) {
                // the writer checks its buffered size every few rows; a tiny block size cuts a group at each check
                builder.withRowGroupSize(1L).withMinRowCountForPageSizeCheck(options.rowsPerGroup())
                        .withMaxRowCountForPageSizeCheck(options.rowsPerGroup());
            }
            try (ParquetWriter<Group> writer = builder.build()) {
                for (List<Object> row : rows) {
                    writer.write(group(groups, type, row));
                }
            }
        } catch (IOException e) {
            throw new UncheckedIOException(e);
        }
        return file;
    }

    private static Group group(SimpleGroupFactory groups, MessageType type, List<Object> row) {
        Group g = groups.newGroup();
        for (int j = 0; j < row.size(); j++) {
            Object cell = row.get(j);
            if (cell == null) {
                continue;
            }
            Type field = type.getType(j);
            PrimitiveType p = field.asPrimitiveType();
            String name = field.getName();
            switch (p.getPrimitiveTypeName()) {
                case BOOLEAN -> g.append(name, (Boolean) cell);
                case INT32 -> g.append(name, p.getLogicalTypeAnnotation() instanceof DecimalLogicalTypeAnnotation d
                        ? new BigDecimal(cell.toString()).setScale(d.getScale()).unscaledValue().intValueExact()
                        : ((Number) cell).intValue());
                case INT64 -> g.append(name, p.getLogicalTypeAnnotation() instanceof DecimalLogicalTypeAnnotation d
                        ? new BigDecimal(cell.toString()).setScale(d.getScale()).unscaledValue().longValueExact()
                        : ((Number) cell).longValue());
                case FLOAT -> g.append(name, ((Number) cell).floatValue());
                case DOUBLE -> g.append(name, ((Number) cell).doubleValue());
                case BINARY -> g.append(name, cell instanceof byte[] bytes ? Binary.fromConstantByteArray(bytes)
                        : p.getLogicalTypeAnnotation() instanceof DecimalLogicalTypeAnnotation d
                        ? Binary.fromConstantByteArray(new BigDecimal(cell.toString()).setScale(d.getScale())
                                .unscaledValue().toByteArray())
                        : Binary.fromString(cell.toString()));
                case FIXED_LEN_BYTE_ARRAY -> g.append(name, Binary.fromConstantByteArray(fixed(p, cell)));
                case INT96 -> g.append(name, Binary.fromConstantByteArray(new byte[12]));
            }
        }
        return g;
    }

    /** A decimal's unscaled value as the column's fixed number of big-endian two's-complement bytes. */
    private static byte[] fixed(PrimitiveType p, Object cell) {
        int scale = ((DecimalLogicalTypeAnnotation) p.getLogicalTypeAnnotation()).getScale();
        byte[] minimal = new BigDecimal(cell.toString()).setScale(scale).unscaledValue().toByteArray();
        byte[] out = new byte[p.getTypeLength()];
        byte fill = minimal[0] < 0 ? (byte) -1 : 0;
        int pad = out.length - minimal.length;
        for (int i = 0; i < out.length; i++) {
            out[i] = i < pad ? fill : minimal[i - pad];
        }
        return out;
    }
}
