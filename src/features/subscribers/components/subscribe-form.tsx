import { zodResolver } from "@hookform/resolvers/zod";
import { useState } from "react";
import { Controller, useForm } from "react-hook-form";
import type { z } from "zod";
import { FrequencySchema, InterestSchema, SubscriptionInputSchema, type SubscriptionOptions } from "#shared/schemas/subscribers.ts";
import { Button } from "../../../components/ui/button.tsx";
import { SelectField, TextField } from "../../../components/ui/field.tsx";
import { Notice } from "../../../components/ui/sheet.tsx";
import { ApiError } from "../../../lib/api-client.ts";
import { useSubscribe } from "../api.ts";
import { FREQUENCY_WORD, INTEREST_WORD } from "../words.ts";
import { ConsentNote } from "./consent-note.tsx";
import { TopicsPicker } from "./topics-picker.tsx";
import { submitting } from "../../../lib/forms.ts";

type Values = z.input<typeof SubscriptionInputSchema>;

const interestOptions = InterestSchema.options.map((v) => ({ value: v, label: INTEREST_WORD[v] }));
const frequencyOptions = FrequencySchema.options.map((v) => ({ value: v, label: FREQUENCY_WORD[v] }));

/** The subscription form: the same schema as the server, the consent wording in view. */
export function SubscribeForm({ options }: { options: SubscriptionOptions }) {
  const subscribe = useSubscribe();
  const [done, setDone] = useState<string | null>(null);
  const form = useForm<Values>({
    resolver: zodResolver(SubscriptionInputSchema),
    defaultValues: { email: "", name: "", organisation: "", interest: "prospect", frequency: "weekly", topics: null, projectSlug: options.project.slug },
  });
  const errors = form.formState.errors;
  const onSubmit = submitting(form, async (v) => {
    const r = await subscribe.mutateAsync({ ...v, projectSlug: options.project.slug });
    setDone(r.message);
  }, "email");
  if (done) return <Notice title="Check your inbox" testId="subscribe-done">{done}</Notice>;
  return (
    <form onSubmit={onSubmit} noValidate className="flex flex-col gap-4">
      <TextField label="E-mail address" type="email" autoComplete="email" error={errors.email?.message} {...form.register("email")} />
      <TextField label="Your name" autoComplete="name" error={errors.name?.message} {...form.register("name")} />
      <TextField label="Organisation (optional)" autoComplete="organization" error={errors.organisation?.message} {...form.register("organisation")} />
      <SelectField
        label="Your interest"
        options={interestOptions}
        hint="Investor content goes only to investor accounts, through the investor room; this list carries public progress."
        error={errors.interest?.message}
        {...form.register("interest")}
      />
      <SelectField label="How often" options={frequencyOptions} error={errors.frequency?.message} {...form.register("frequency")} />
      <Controller
        control={form.control}
        name="topics"
        render={({ field, fieldState }) => (
          <TopicsPicker value={field.value ?? null} onChange={field.onChange} areas={options.areas} systems={options.systems} error={fieldState.error?.message ?? fieldState.error?.root?.message ?? (errors as Record<string, { message?: string }>)["topics.areas"]?.message} />
        )}
      />
      <ConsentNote consent={options.consent} />
      <Button type="submit" variant="primary" busy={subscribe.isPending}>
        Subscribe
      </Button>
      {subscribe.error instanceof ApiError && subscribe.error.status === 429 ? <Notice tone="error">{subscribe.error.message}</Notice> : null}
    </form>
  );
}
