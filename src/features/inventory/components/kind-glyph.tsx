import type { ComponentKind } from "../../../domain/vocab";
import { COMPONENT_KIND_LABELS } from "../../../domain/vocab";

/**
 * Tideline's own small line drawings of what sits in a position, 20×20, stroked in the
 * current text colour. Drawn for this product: simple shapes a crew can learn in a day.
 */
const GLYPHS: Record<ComponentKind, React.ReactNode> = {
  // a case with a toggle lever standing out of it
  molded_case_breaker: (
    <>
      <rect x="4" y="3" width="12" height="14" rx="1.5" />
      <path d="M10 6v5" strokeWidth="3" />
      <path d="M7 14h6" />
    </>
  ),
  // a tall open frame with two racking rails and a handle wheel
  power_breaker: (
    <>
      <rect x="3" y="2.5" width="14" height="15" rx="1" />
      <path d="M6 2.5v15M14 2.5v15" />
      <circle cx="10" cy="10" r="2.5" />
    </>
  ),
  // a round dial with a needle
  meter: (
    <>
      <circle cx="10" cy="10" r="7" />
      <path d="M5.5 12a5 5 0 0 1 9 0" />
      <path d="M10 12.5 13 7" />
    </>
  ),
  // a bulb with three short rays
  ground_lamp: (
    <>
      <circle cx="10" cy="11" r="4.5" />
      <path d="M10 2.5v2M4 5l1.4 1.4M16 5l-1.4 1.4M8.5 16.5h3" />
    </>
  ),
  // a cartridge with end caps and a wire through
  fuse: (
    <>
      <rect x="3" y="7" width="14" height="6" rx="3" />
      <path d="M1.5 10h17" />
    </>
  ),
  // an open knife blade between two contacts
  switch: (
    <>
      <circle cx="4" cy="14" r="1.6" />
      <circle cx="16" cy="14" r="1.6" />
      <path d="M5.3 13 14 6" />
    </>
  ),
  // two bus stubs joined by a bridge
  bus_tie: (
    <>
      <path d="M2 6h6M12 6h6M2 14h6M12 14h6" />
      <path d="M8 6v8M12 6v8M8 10h4" />
    </>
  ),
  // three parallel bars, one per phase
  busbar: (
    <>
      <path d="M3 5h14M3 10h14M3 15h14" strokeWidth="2.2" />
    </>
  ),
  // two linked windings
  transformer: (
    <>
      <circle cx="7.5" cy="10" r="4.5" />
      <circle cx="12.5" cy="10" r="4.5" />
    </>
  ),
  // a coil box with a contact arm
  relay: (
    <>
      <rect x="3" y="4" width="8" height="12" rx="1" />
      <path d="M5 7h4M5 10h4M5 13h4" />
      <path d="M11 10h3l3-3" />
    </>
  ),
  // a row of screw terminals
  terminal_strip: (
    <>
      <rect x="2" y="6" width="16" height="8" rx="1" />
      <circle cx="6" cy="10" r="1.3" />
      <circle cx="10" cy="10" r="1.3" />
      <circle cx="14" cy="10" r="1.3" />
    </>
  ),
  // a small box with a chip and a pointer dial: the trip unit's setting knob
  electronic_trip_unit: (
    <>
      <rect x="3" y="4" width="14" height="12" rx="1.5" />
      <rect x="5.5" y="7" width="4" height="4" />
      <circle cx="13.5" cy="9" r="2" />
      <path d="M13.5 9 14.8 7.7" />
    </>
  ),
  // a closed box with a handle on its side
  enclosed_switch: (
    <>
      <rect x="3" y="3" width="11" height="14" rx="1" />
      <path d="M14 8h3v5" strokeWidth="2" />
      <path d="M6 7h5M6 10h5" />
    </>
  ),
  // a diamond for anything else
  other: (
    <>
      <path d="M10 3 17 10 10 17 3 10Z" />
    </>
  ),
};

export function KindGlyph({
  kind,
  className = "h-4 w-4",
  title,
}: {
  kind: ComponentKind;
  className?: string;
  title?: boolean;
}) {
  return (
    <svg
      viewBox="0 0 20 20"
      className={className}
      fill="none"
      stroke="currentColor"
      strokeWidth="1.6"
      strokeLinecap="round"
      strokeLinejoin="round"
      aria-hidden={title ? undefined : true}
      role={title ? "img" : undefined}
      aria-label={title ? COMPONENT_KIND_LABELS[kind] : undefined}
    >
      {GLYPHS[kind]}
    </svg>
  );
}
