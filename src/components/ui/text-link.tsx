import { Link, type LinkProps } from "react-router-dom";
import { cn } from "@/lib/cn";

export const LINK_CLASSES = "font-medium text-frost-ink underline decoration-frost/40 underline-offset-2 hover:decoration-frost";

/** An in-app link styled as running text (underlined, not by colour alone). */
export function TextLink({ className, ...props }: LinkProps) {
  return <Link className={cn(LINK_CLASSES, className)} {...props} />;
}
