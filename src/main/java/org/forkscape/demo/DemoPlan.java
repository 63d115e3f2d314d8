package org.forkscape.demo;

/**
 * The demo's plan, one for each world: every decision kind, sized to a few thousand specifications.
 * Written out as text so that the committed plan files read as a person would write them.
 */
final class DemoPlan {
    private DemoPlan() {
    }

    static String json(String dataFile, String title, String description) {
        return """
                {
                  "title": "%s",
                  "description": "%s",
                  "data": "%s",
                  "confidence": 0.95,
                  "missing": "per-specification",
                  "decisions": [
                    {
                      "name": "outcome",
                      "kind": "outcome",
                      "alternatives": [
                        {"label": "reading score", "column": "reading_score"},
                        {"label": "log reading fluency", "column": "reading_fluency", "transform": "log"}
                      ]
                    },
                    {
                      "name": "tutoring",
                      "kind": "predictor",
                      "alternatives": [
                        {"label": "hours", "column": "tutoring_hours"},
                        {"label": "hours, standardized", "column": "tutoring_hours", "transform": "standardize"},
                        {"label": "hours, winsorized 5%%", "column": "tutoring_hours", "transform": "winsorize:0.05"}
                      ]
                    },
                    {
                      "name": "pupil controls",
                      "kind": "controls",
                      "required": ["prior_score", "year_group", "english_additional"],
                      "optional": ["free_meals", "attendance", "home_reading"],
                      "combine": "all-subsets"
                    },
                    {
                      "name": "school context",
                      "kind": "controls",
                      "combine": "sets",
                      "sets": {
                        "none": [],
                        "class size and zone": ["class_size", "zone"]
                      }
                    },
                    {
                      "name": "pupils",
                      "kind": "sample",
                      "alternatives": [
                        {"label": "all pupils"},
                        {"label": "regular attenders", "keep": "attendance >= 90"}
                      ]
                    },
                    {
                      "name": "register errors",
                      "kind": "sample",
                      "alternatives": [
                        {"label": "keep all"},
                        {"label": "within the 60-hour cap", "keep": "tutoring_hours <= 60"},
                        {"label": "trim hours beyond 3 sd", "trim": {"column": "tutoring_hours", "z": 3}}
                      ]
                    },
                    {
                      "name": "standard errors",
                      "kind": "errors",
                      "alternatives": ["classical", "HC1", "HC3", "cluster:school"]
                    },
                    {
                      "name": "fixed effects",
                      "kind": "absorb",
                      "alternatives": [
                        {"label": "none", "columns": []},
                        {"label": "zone", "columns": ["zone"]}
                      ]
                    }
                  ]
                }
                """.formatted(title, description, dataFile);
    }

    /**
     * The models plan over the demo's data: reading fluency as recorded (words per minute) by least squares
     * and by Poisson regression, whose log link makes its coefficient the planted effect on the logarithm;
     * the average marginal effect puts both on the outcome's own scale.
     */
    static String modelsJson(String dataFile, String title, String description) {
        return """
                {
                  "title": "%s",
                  "description": "%s",
                  "data": "%s",
                  "confidence": 0.95,
                  "missing": "per-specification",
                  "decisions": [
                    {
                      "name": "outcome",
                      "kind": "outcome",
                      "alternatives": [
                        {"label": "reading fluency", "column": "reading_fluency"}
                      ]
                    },
                    {
                      "name": "tutoring",
                      "kind": "predictor",
                      "alternatives": [
                        {"label": "hours", "column": "tutoring_hours"},
                        {"label": "hours, winsorized 5%%", "column": "tutoring_hours", "transform": "winsorize:0.05"}
                      ]
                    },
                    {
                      "name": "pupil controls",
                      "kind": "controls",
                      "required": ["prior_score", "year_group", "english_additional"],
                      "optional": ["free_meals", "attendance", "home_reading"],
                      "combine": "all-subsets"
                    },
                    {
                      "name": "register errors",
                      "kind": "sample",
                      "alternatives": [
                        {"label": "keep all"},
                        {"label": "within the 60-hour cap", "keep": "tutoring_hours <= 60"}
                      ]
                    },
                    {
                      "name": "standard errors",
                      "kind": "errors",
                      "alternatives": ["HC1", "cluster:school"]
                    },
                    {
                      "name": "fixed effects",
                      "kind": "absorb",
                      "alternatives": [
                        {"label": "none", "columns": []},
                        {"label": "zone", "columns": ["zone"]}
                      ]
                    },
                    {
                      "name": "model",
                      "kind": "model",
                      "alternatives": ["ols", "poisson"]
                    }
                  ]
                }
                """.formatted(title, description, dataFile);
    }

    /**
     * The panel demo's plan: nitrate at stream sites over seasons, with the fixed effects, weights and
     * clustering a panel's authors must choose among (site, season or both; unweighted or weighted by the
     * number of grab samples; errors clustered by site, or by site and season).
     */
    static String panelJson(String dataFile, String title, String description) {
        return """
                {
                  "title": "%s",
                  "description": "%s",
                  "data": "%s",
                  "confidence": 0.95,
                  "missing": "per-specification",
                  "decisions": [
                    {
                      "name": "outcome",
                      "kind": "outcome",
                      "alternatives": [
                        {"label": "nitrate (mg/L)", "column": "nitrate"},
                        {"label": "log nitrate", "column": "nitrate", "transform": "log"}
                      ]
                    },
                    {
                      "name": "buffer",
                      "kind": "predictor",
                      "alternatives": [
                        {"label": "hectares planted", "column": "buffer_ha"},
                        {"label": "share of the strip planted (%%)", "column": "buffer_share"}
                      ]
                    },
                    {
                      "name": "conditions",
                      "kind": "controls",
                      "optional": ["rainfall_mm", "water_temp", "flow", "cropland_share"],
                      "combine": "all-subsets"
                    },
                    {
                      "name": "fixed effects",
                      "kind": "absorb",
                      "alternatives": [
                        {"label": "none", "columns": []},
                        {"label": "site", "columns": ["site"]},
                        {"label": "season", "columns": ["season"]},
                        {"label": "site and season", "columns": ["site", "season"]},
                        {"label": "site and catchment-season", "columns": ["site", "catchment_season"]}
                      ]
                    },
                    {
                      "name": "standard errors",
                      "kind": "errors",
                      "alternatives": ["classical", "HC1", "cluster:site", "cluster:site+season"]
                    },
                    {
                      "name": "weights",
                      "kind": "weights",
                      "alternatives": [
                        {"label": "unweighted"},
                        {"label": "by grab samples", "column": "samples"}
                      ]
                    }
                  ],
                  "reported": {
                    "outcome": "nitrate (mg/L)",
                    "buffer": "hectares planted",
                    "conditions": "rainfall_mm + water_temp + flow + cropland_share",
                    "fixed effects": "site and season",
                    "standard errors": "cluster:site+season",
                    "weights": "by grab samples"
                  }
                }
                """.formatted(title, description, dataFile);
    }
}
