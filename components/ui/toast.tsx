"use client";
import * as RadixToast from "@radix-ui/react-toast";
import { createContext, useCallback, useContext, useState, type ReactNode } from "react";
import { cx } from "./cx";

type ToastTone = "leaf" | "danger";
interface ToastItem {
  id: number;
  message: string;
  tone: ToastTone;
}

const ToastContext = createContext<(message: string, tone?: ToastTone) => void>(() => {});

/** Short confirmations ("Roles saved") that fade on their own; errors stay in the form. */
export function ToastProvider({ children }: { children: ReactNode }) {
  const [items, setItems] = useState<ToastItem[]>([]);
  const push = useCallback((message: string, tone: ToastTone = "leaf") => {
    setItems((list) => [...list, { id: Date.now() + Math.random(), message, tone }]);
  }, []);
  return (
    <ToastContext.Provider value={push}>
      <RadixToast.Provider duration={5000} label="Notification">
        {children}
        {items.map((t) => (
          <RadixToast.Root
            key={t.id}
            onOpenChange={(open) => !open && setItems((list) => list.filter((x) => x.id !== t.id))}
            className={cx("rounded-lg border-l-4 bg-surface px-4 py-3 shadow-lg", t.tone === "danger" ? "border-danger" : "border-leaf")}
            data-testid="toast"
          >
            <RadixToast.Description className="font-bold">{t.message}</RadixToast.Description>
          </RadixToast.Root>
        ))}
        <RadixToast.Viewport className="fixed bottom-4 right-4 z-50 flex w-80 flex-col gap-2" />
      </RadixToast.Provider>
    </ToastContext.Provider>
  );
}

export function useToast() {
  return useContext(ToastContext);
}
