/** Chart heights, known before the chart code loads, so the space is held and nothing below jumps. */
export const REASON_ROW_HEIGHT = 24;
export const REASON_CHART_PADDING = 36;
export const ACTIVITY_CHART_HEIGHT = 180;
