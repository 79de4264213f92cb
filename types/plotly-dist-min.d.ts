declare module "plotly.js-dist-min" {
  const Plotly: unknown;
  export default Plotly;
}
