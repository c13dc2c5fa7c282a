// What a user of the command's package needs: run the command in-process, read and write decision
// logs, and draw reports (for example from a notebook). Everything else is internal to the command.
export { main } from "./main.js";
export { EXIT_OK, EXIT_USAGE, EXIT_INPUT, EXIT_INTERNAL, CliError, UsageError, InputError, InterruptedError } from "./exit-codes.js";
export type { CliStreams } from "./io.js";
export { parseConfig, buildEngine } from "./config.js";
export type { PipelineConfig } from "./config.js";
export { readDecisionLog } from "./decision-log.js";
export type { DecisionLogInfo, LoggedDecision } from "./decision-log.js";
export { logFormat } from "./log/compact-log.js";
export type { DecisionLogFormat, LogForm } from "./log/compact-log.js";
export { ReportCollector } from "./report/lanes.js";
export type { Lane, ReportData } from "./report/lanes.js";
export { TimelineCollector } from "./report/timeline.js";
export type { ReportTimeline, BucketSeries, TimelineCollectorOptions } from "./report/timeline.js";
export { renderReport, FIGURE_STYLE } from "./report/html.js";
export type { ReportContent } from "./report/html.js";
export { axisOf, linePlot, eventStrip, groupSeries } from "./report/plots.js";
export type { AxisSpan, LinePlotOptions, ReportEvent, Trace } from "./report/plots.js";
export { SAFETY_CAUTION } from "./report/safety.js";
export { demoEngineOptions } from "./commands/demo.js";
