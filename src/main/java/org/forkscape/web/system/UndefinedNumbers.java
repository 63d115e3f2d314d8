package org.forkscape.web.system;

import org.springframework.boot.jackson.autoconfigure.JsonMapperBuilderCustomizer;
import org.springframework.context.annotation.Bean;
import org.springframework.context.annotation.Configuration;
import tools.jackson.core.JsonGenerator;
import tools.jackson.core.StreamWriteFeature;
import tools.jackson.databind.SerializationContext;
import tools.jackson.databind.ValueSerializer;
import tools.jackson.databind.module.SimpleModule;

/**
 * How the JSON API writes numbers. Undefined numbers (NaN, infinities) as {@code null}, as summary.json
 * does: JSON has no NaN, and a string in place of a number would surprise every script reading the API.
 * Finite doubles as the shortest decimal that reads back as the same double, by the Schubfach algorithm
 * (Giulietti 2020, "The Schubfach way to render doubles", published with its Java implementation, which
 * Jackson bundles): Java 17's {@code Double.toString} is several times slower, took a seventh of a curve
 * request's time under load (the curve's bins are thousands of doubles), and is not always shortest
 * (JDK-4511638); both read back as the same double, so the browser sees the same numbers.
 */
@Configuration(proxyBeanMethods = false)
class UndefinedNumbers {

    @Bean
    JsonMapperBuilderCustomizer undefinedNumbersAsNull() {
        SimpleModule module = new SimpleModule("forkscape-undefined-numbers");
        module.addSerializer(Double.class, new FiniteOrNull());
        module.addSerializer(Double.TYPE, new FiniteOrNull());
        module.addSerializer(double[].class, new FiniteArray());
        return builder -> builder.addModule(module).enable(StreamWriteFeature.USE_FAST_DOUBLE_WRITER);
    }

    private static final class FiniteOrNull extends ValueSerializer<Double> {
        @Override
        public void serialize(Double value, JsonGenerator gen, SerializationContext context) {
            if (value == null || !Double.isFinite(value)) {
                gen.writeNull();
            } else {
                gen.writeNumber(value);
            }
        }
    }

    private static final class FiniteArray extends ValueSerializer<double[]> {
        @Override
        public void serialize(double[] values, JsonGenerator gen, SerializationContext context) {
            gen.writeStartArray(values, values.length);
            for (double v : values) {
                if (Double.isFinite(v)) {
                    gen.writeNumber(v);
                } else {
                    gen.writeNull();
                }
            }
            gen.writeEndArray();
        }
    }
}
