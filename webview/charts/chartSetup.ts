import { Chart, LineController, LineElement, LinearScale, PointElement, type Plugin } from 'chart.js';
import type { ViewState } from '../viewState';
import { readThemeColors, withAlpha } from '../theme';

Chart.register(LineController, LineElement, PointElement, LinearScale);

/**
 * Draws the baseline and incident windows as shaded bands under the line and the shared
 * crosshair over it; both read the page state at draw time, so a redraw is all a change needs.
 */
export function createOverlayPlugin(state: ViewState): Plugin<'line'> {
  return {
    id: 'triageOverlay',
    beforeDatasetsDraw(chart) {
      const { ctx, chartArea, scales } = chart;
      const colors = readThemeColors();
      const shade = (startMs: number, endMs: number, color: string): void => {
        const left = Math.max(chartArea.left, scales.x.getPixelForValue(startMs));
        const right = Math.min(chartArea.right, scales.x.getPixelForValue(endMs));
        if (right <= left) return;
        ctx.save();
        ctx.fillStyle = withAlpha(color, 0.16);
        ctx.fillRect(left, chartArea.top, right - left, chartArea.bottom - chartArea.top);
        ctx.restore();
      };
      shade(state.baseline.startMs, state.baseline.endMs, colors.baseline);
      shade(state.incident.startMs, state.incident.endMs, colors.incident);
    },
    afterDatasetsDraw(chart) {
      if (state.hoverMs === undefined) return;
      const { ctx, chartArea, scales } = chart;
      const x = scales.x.getPixelForValue(state.hoverMs);
      if (x < chartArea.left || x > chartArea.right) return;
      ctx.save();
      ctx.strokeStyle = readThemeColors().crosshair;
      ctx.setLineDash([3, 3]);
      ctx.beginPath();
      ctx.moveTo(x, chartArea.top);
      ctx.lineTo(x, chartArea.bottom);
      ctx.stroke();
      ctx.restore();
    },
  };
}

export { Chart };
