import Link from "next/link";

/** A session in one line under its title: sample (a link), date, tip, temperature, operator. */
export function SessionLine(props: {
  lab: string;
  sampleId: string;
  sampleName: string;
  date: string;
  tipLabel?: string | null;
  temperatureK?: number | null;
  operatorName?: string | null;
}) {
  const { lab, sampleId, sampleName, date, tipLabel, temperatureK, operatorName } = props;
  return (
    <>
      <Link className="underline-offset-2 hover:underline" href={`/labs/${lab}/samples/${sampleId}`}>
        {sampleName}
      </Link>{" "}
      · <span className="num">{date}</span>
      {tipLabel ? ` · tip ${tipLabel}` : ""}
      {temperatureK != null ? ` · ${temperatureK} K` : ""}
      {operatorName ? ` · ${operatorName}` : ""}
    </>
  );
}
