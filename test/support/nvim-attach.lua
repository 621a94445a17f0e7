-- Headless Neovim as a third-party LSP client: attaches the bundled Tidemark server to the
-- current buffer, waits for its diagnostics to settle, and writes them as JSON to $TIDEMARK_OUT.
-- Uses the Neovim 0.7 API (vim.lsp.start_client), which later versions still provide.
local server = os.getenv('TIDEMARK_SERVER')
local out = os.getenv('TIDEMARK_OUT')
local buf = vim.api.nvim_get_current_buf()
local file = vim.api.nvim_buf_get_name(buf)
local client = vim.lsp.start_client({
  name = 'tidemark',
  cmd = { 'node', server, '--stdio' },
  root_dir = vim.fn.fnamemodify(file, ':h'),
})
vim.lsp.buf_attach_client(buf, client)
-- diagnostics arrive in one publish per file; wait for them, then a little longer for stragglers
vim.wait(30000, function() return #vim.diagnostic.get(buf) > 0 end, 50)
vim.wait(1000, function() return false end, 50)
local list = {}
for _, d in ipairs(vim.diagnostic.get(buf)) do
  local code = d.code
  if code == nil and d.user_data and d.user_data.lsp then code = d.user_data.lsp.code end
  table.insert(list, { line = d.lnum + 1, column = d.col + 1, severity = d.severity, code = code, message = d.message })
end
local f = io.open(out, 'w')
f:write(vim.fn.json_encode(list))
f:close()
vim.lsp.stop_client(client)
vim.cmd('qa!')
