/**
 * The page's entry: uPlot's stylesheet and the page's element. Everything it loads is bundled
 * by Vite into client/dist; the page makes no request beyond its own server.
 */
import 'uplot/dist/uPlot.min.css';
import './components/coilcue-app.ts';
