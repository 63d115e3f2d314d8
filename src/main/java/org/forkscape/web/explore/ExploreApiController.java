package org.forkscape.web.explore;

import org.forkscape.run.StoredAnalysis;
import org.forkscape.run.StoredRun;
import org.forkscape.web.system.Lookup;
import org.springframework.web.bind.annotation.GetMapping;
import org.springframework.web.bind.annotation.PathVariable;
import org.springframework.web.bind.annotation.RequestMapping;
import org.springframework.web.bind.annotation.RequestParam;
import org.springframework.web.bind.annotation.RestController;

/**
 * The explorer's data. Every request that depends on the filter takes {@code drop} (the unticked levels,
 * {@code F.L,F.L}), {@code sort} ({@code estimate} or {@code factor:F}), {@code scale} ({@code fitted},
 * {@code standardized}, {@code partial} or {@code t}) and, as fitted, {@code group} (the comparable group).
 */
@RestController
@RequestMapping("/api/analyses/{analysis}/runs/{run}")
class ExploreApiController {
    private final ExploreService explore;
    private final Lookup lookup;

    ExploreApiController(ExploreService explore, Lookup lookup) {
        this.explore = explore;
        this.lookup = lookup;
    }

    @GetMapping("/layout")
    ExploreViews.Layout layout(@PathVariable String analysis, @PathVariable String run) {
        StoredAnalysis a = lookup.analysis(analysis);
        return explore.layout(a, lookup.run(a, run));
    }

    @GetMapping("/curve")
    ExploreViews.CurveView curve(@PathVariable String analysis, @PathVariable String run,
            @RequestParam(name = "drop", defaultValue = "") String drop,
            @RequestParam(name = "sort", defaultValue = "estimate") String sort,
            @RequestParam(name = "scale", defaultValue = "fitted") String scale,
            @RequestParam(name = "group", defaultValue = "") String group,
            @RequestParam(name = "width", defaultValue = "1000") int width) {
        StoredAnalysis a = lookup.analysis(analysis);
        StoredRun r = lookup.run(a, run);
        return explore.curve(a, r, drop, sort, scale, group, width);
    }

    @GetMapping("/at")
    ExploreViews.SpecificationView at(@PathVariable String analysis, @PathVariable String run,
            @RequestParam(name = "position") int position,
            @RequestParam(name = "drop", defaultValue = "") String drop,
            @RequestParam(name = "sort", defaultValue = "estimate") String sort,
            @RequestParam(name = "scale", defaultValue = "fitted") String scale,
            @RequestParam(name = "group", defaultValue = "") String group) {
        StoredAnalysis a = lookup.analysis(analysis);
        return explore.at(a, lookup.run(a, run), drop, sort, scale, group, position);
    }

    /** Where a specification sits in the curve under the given filter, order and scale: -1 when not shown. */
    @GetMapping("/specifications/{spec}/position")
    ExploreViews.PositionView position(@PathVariable String analysis, @PathVariable String run,
            @PathVariable long spec,
            @RequestParam(name = "drop", defaultValue = "") String drop,
            @RequestParam(name = "sort", defaultValue = "estimate") String sort,
            @RequestParam(name = "scale", defaultValue = "fitted") String scale,
            @RequestParam(name = "group", defaultValue = "") String group) {
        StoredAnalysis a = lookup.analysis(analysis);
        return new ExploreViews.PositionView(spec, explore.positionOf(a, lookup.run(a, run), drop, sort, scale, group,
                spec));
    }

    @GetMapping("/specifications/{spec}/fit")
    ExploreViews.FullFitView fit(@PathVariable String analysis, @PathVariable String run, @PathVariable long spec) {
        StoredAnalysis a = lookup.analysis(analysis);
        return explore.fit(a, lookup.run(a, run), spec);
    }
}
