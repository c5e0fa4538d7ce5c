import { useQuery } from "@tanstack/react-query";
import { pressTermsQueryOptions, publicPressKitUrl } from "../press-kit-api.ts";

/**
 * "Download these photographs": the cleared public photographs shown here as one zip, with the
 * credits and the project's usage terms in its manifest (decision 062). The terms line is read
 * after the page (it is the same for every page of the project).
 */
export function PressKitLink({ slug, operatorName, of, what, className = "" }: { slug: string; operatorName: string; of: { area?: string; story?: string }; what: string; className?: string }) {
  const terms = useQuery(pressTermsQueryOptions(slug)).data;
  return (
    <p className={`text-sm ${className}`} data-testid="press-kit-link">
      <a href={publicPressKitUrl(slug, of)} download className="font-medium text-ink underline underline-offset-4">
        Download these photographs
      </a>{" "}
      <span className="text-ink-soft">({what}, one zip with captions and credits)</span>
      {terms ? <span className="mt-1 block text-ink-soft">{terms.usageTerms ? `Usage terms: ${terms.usageTerms}` : `Ask ${operatorName} before publishing them.`}</span> : null}
    </p>
  );
}
