export function ForbiddenNotice() {
  return (
    <div className="rounded-lg border border-danger-600/30 bg-danger-50 p-6" data-testid="forbidden">
      <h1 className="font-semibold text-danger-700">Your role does not allow this</h1>
      <p className="mt-1 text-sm text-slate-700">Ask the owner of your company if you need access.</p>
    </div>
  );
}
