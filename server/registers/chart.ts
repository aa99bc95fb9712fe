// The registers overview's bar chart lives with the other pure charts.
export { barChartSvg, type Bar } from '../../shared/charts/svg';
