import {
  BarController,
  BarElement,
  CategoryScale,
  Chart,
  Filler,
  Legend,
  LinearScale,
  LineController,
  LineElement,
  LogarithmicScale,
  PointElement,
  ScatterController,
  Tooltip,
} from 'chart.js';

Chart.register(
  BarController,
  BarElement,
  CategoryScale,
  Filler,
  Legend,
  LinearScale,
  LineController,
  LineElement,
  LogarithmicScale,
  PointElement,
  ScatterController,
  Tooltip,
);
Chart.defaults.font.family = "'Manrope', ui-sans-serif, system-ui, sans-serif";
Chart.defaults.font.size = 12;
Chart.defaults.color = '#4b6b75';
Chart.defaults.borderColor = '#d8e3e6';
Chart.defaults.animation = false;

/** Ballast's chart colours, the theme's own. */
export const chartColours = {
  ink: '#17313a',
  ink500: '#4b6b75',
  ink300: '#86a3ab',
  ink100: '#d8e3e6',
  brass: '#d39b3f',
  brass700: '#9a6b1f',
  kelp: '#3f8a6c',
  coral: '#c4523f',
};
