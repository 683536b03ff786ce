/**
 * The demo's times are written as the crew would log them: on the site's own clock (DEMO_SITE.timeZone,
 * America/Halifax), so a morning's megger round reads 08:00 on every page, report and export, not 04:00.
 */
import { localDateTime } from "../../src/domain/local-time";
import { DEMO_SITE } from "./people";

/** The instant at which the demo site's clock reads `year`-`month0 + 1`-`day` `hour`:`minute` (days may overflow). */
export function onSiteClock(year: number, month0: number, day: number, hour: number, minute = 0): Date {
  const wall = Date.UTC(year, month0, day, hour, minute);
  let t = wall;
  // Two corrections settle any offset (an hour the clock skips in spring reads an hour later, as a clock would).
  for (let i = 0; i < 2; i++)
    t += wall - Date.parse(`${localDateTime(new Date(t), DEMO_SITE.timeZone).replace(" ", "T")}Z`);
  return new Date(t);
}
