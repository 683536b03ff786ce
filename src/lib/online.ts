import { onlineManager } from "@tanstack/react-query";
import { useEffect, useSyncExternalStore } from "react";

const subscribe = (l: () => void) => onlineManager.subscribe(l);
const isOnline = () => onlineManager.isOnline();

/** Whether the phone has a connection, as TanStack Query's onlineManager has it (reads pause without one). */
export function useOnline(): boolean {
  return useSyncExternalStore(subscribe, isOnline);
}

/** Runs `fn` each time the connection returns, while the calling component is on screen. */
export function useWhenOnline(fn: () => void) {
  useEffect(() => onlineManager.subscribe((now) => now && fn()), [fn]);
}
