package org.forkscape.fit;

import java.util.List;
import tools.jackson.databind.JsonNode;
import tools.jackson.databind.ObjectMapper;
import tools.jackson.databind.node.ArrayNode;
import tools.jackson.databind.node.ObjectNode;

/** Plan texts edited for tests that run a committed plan without some of its choices. */
public final class PlanEdits {
    private PlanEdits() {
    }

    /** The plan text with the named alternatives taken out of the named decision. */
    public static String withoutAlternatives(String planText, String decision, List<String> labels) {
        ObjectMapper json = new ObjectMapper();
        ObjectNode root = (ObjectNode) json.readTree(planText);
        for (JsonNode d : root.get("decisions")) {
            if (d.get("name").asString().equals(decision)) {
                ArrayNode kept = json.createArrayNode();
                for (JsonNode alt : d.get("alternatives")) {
                    if (!labels.contains(alt.asString())) {
                        kept.add(alt);
                    }
                }
                ((ObjectNode) d).set("alternatives", kept);
            }
        }
        return json.writeValueAsString(root);
    }

    /**
     * The demo plan's "school context" sets without the zone control (class size alone), which is collinear
     * with the absorbed zone and sends its specifications to the precision guard's QR refit.
     */
    public static String withoutZoneControl(String planText) {
        ObjectMapper json = new ObjectMapper();
        ObjectNode root = (ObjectNode) json.readTree(planText);
        for (JsonNode d : root.get("decisions")) {
            if (d.get("name").asString().equals("school context")) {
                ObjectNode sets = json.createObjectNode();
                sets.set("none", json.createArrayNode());
                sets.set("class size", json.createArrayNode().add("class_size"));
                ((ObjectNode) d).set("sets", sets);
            }
        }
        return json.writeValueAsString(root);
    }

    /** The demo plan as far as a run from statistics alone goes: no HC1 or HC3, no zone control. */
    public static String demoFromStatistics(String demoPlanText) {
        return withoutZoneControl(withoutAlternatives(demoPlanText, "standard errors", List.of("HC1", "HC3")));
    }
}
