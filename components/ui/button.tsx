import type { ButtonHTMLAttributes } from "react";

const VARIANTS = {
  primary: "border-lichen bg-lichen text-white hover:bg-lichen-deep disabled:border-paper-edge disabled:bg-paper-edge",
  secondary: "border-paper-edge bg-white text-graphite hover:bg-paper-sunk disabled:text-graphite-faint",
  danger: "border-rust bg-rust text-white hover:bg-rust-deep disabled:border-paper-edge disabled:bg-paper-edge",
  quiet: "border-transparent bg-transparent text-lichen-deep hover:bg-lichen-wash disabled:text-graphite-faint",
} as const;

export type ButtonVariant = keyof typeof VARIANTS;

export interface ButtonProps extends ButtonHTMLAttributes<HTMLButtonElement> {
  variant?: ButtonVariant;
  size?: "sm" | "md";
}

export function Button({ variant = "secondary", size = "md", className = "", type = "button", ...rest }: ButtonProps) {
  const sizing = size === "sm" ? "px-2 py-1 text-xs" : "px-3 py-1.5 text-sm";
  return (
    <button
      type={type}
      className={`inline-flex items-center justify-center gap-1.5 whitespace-nowrap rounded border font-medium transition-colors disabled:cursor-not-allowed ${sizing} ${VARIANTS[variant]} ${className}`}
      {...rest}
    />
  );
}

/** A link (a download, another page) drawn as a small secondary button. */
export const LINK_BUTTON_CLASS =
  "inline-flex items-center rounded border border-paper-edge bg-white px-2 py-1 text-xs font-medium text-graphite hover:bg-paper-sunk hover:no-underline";
