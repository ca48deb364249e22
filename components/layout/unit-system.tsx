"use client";

import { createContext, useCallback, useContext } from "react";
import { renderQuantities } from "@/lib/quantity-text";
import type { UnitSystem } from "@/lib/units";

// The signed-in viewer's unit system for client components: words pushed over the socket carry
// quantity tokens (one push serves viewers with different units), and each browser renders them.

const UnitSystemContext = createContext<UnitSystem>("ip");

export function UnitSystemProvider({ unitSystem, children }: { unitSystem: UnitSystem; children: React.ReactNode }) {
  return <UnitSystemContext.Provider value={unitSystem}>{children}</UnitSystemContext.Provider>;
}

export function useUnitSystem(): UnitSystem {
  return useContext(UnitSystemContext);
}

/** Stored or pushed words with their quantities in the viewer's units. */
export function useQuantityText(): (text: string) => string {
  const system = useUnitSystem();
  return useCallback((text: string) => renderQuantities(text, system), [system]);
}
