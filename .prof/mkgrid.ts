import { writeGrid } from "../scripts/bench/spectra";
console.log(writeGrid("/tmp/grid.tsv"));
